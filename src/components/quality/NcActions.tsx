/**
 * Dispositions of a nonconformance's held jobs and its closing, each an electronic signature
 * (password + meaning). The server checks the password before anything changes.
 */
import { useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import { DISPOSITIONS, DISPOSITION_LABELS, HOLD_SIGN_MEANINGS, type Disposition } from '../../lib/shared/quality.ts';
import SignDialog from '../shell/SignDialog.tsx';

export default function NcActions({
  ncId,
  activeHolds,
  canDisposition,
  canClose,
}: {
  ncId: number;
  activeHolds: { id: number; jobNumber: string }[];
  canDisposition: boolean;
  canClose: boolean;
}) {
  const [selected, setSelected] = useState<Set<number>>(new Set(activeHolds.map((h) => h.id)));
  const [disposition, setDisposition] = useState<Disposition>('recoat');
  const [comment, setComment] = useState('');
  const [signing, setSigning] = useState<'disposition' | 'close' | null>(null);
  const [error, setError] = useState<string | null>(null);

  function start(what: 'disposition' | 'close') {
    setError(null);
    if (what === 'disposition') {
      if (selected.size === 0) return setError('Select at least one held job.');
      if (comment.trim().length < 3) return setError('Say why (at least 3 characters).');
    }
    setSigning(what);
  }
  async function sign(password: string, meaning: string) {
    if (signing === 'disposition') {
      await apiFetch(`/api/v1/nonconformances/${ncId}/dispositions`, {
        body: { holdIds: [...selected], disposition, comment: comment.trim(), password, meaning },
      });
    } else {
      await apiFetch(`/api/v1/nonconformances/${ncId}/close`, { body: { comment: comment.trim(), password, meaning } });
    }
    window.location.reload();
  }
  const jobs = activeHolds.filter((h) => selected.has(h.id)).map((h) => h.jobNumber);
  return (
    <div className="space-y-3 no-print">
      {canDisposition && activeHolds.length > 0 && (
        <div className="panel space-y-2" role="group" aria-labelledby="disp-h">
          <h2 id="disp-h">Disposition held jobs</h2>
          <div className="flex flex-wrap gap-2 text-sm">
            <button type="button" className="btn-quiet" onClick={() => setSelected(new Set(activeHolds.map((h) => h.id)))}>
              All {activeHolds.length}
            </button>
            <button type="button" className="btn-quiet" onClick={() => setSelected(new Set())}>
              None
            </button>
          </div>
          <div className="max-h-48 overflow-auto rounded border border-slate-line p-2">
            {activeHolds.map((h) => (
              <label key={h.id} className="mr-4 inline-flex items-center gap-1 font-normal num">
                <input
                  type="checkbox"
                  className="w-auto"
                  checked={selected.has(h.id)}
                  onChange={() => {
                    const n = new Set(selected);
                    if (n.has(h.id)) n.delete(h.id);
                    else n.add(h.id);
                    setSelected(n);
                  }}
                />{' '}
                {h.jobNumber}
              </label>
            ))}
          </div>
          <div className="flex flex-wrap items-end gap-3">
            <div>
              <label htmlFor="nc-disp">Disposition</label>
              <select
                id="nc-disp"
                value={disposition}
                onChange={(e) => setDisposition(e.target.value as Disposition)}
                className="w-64"
              >
                {DISPOSITIONS.map((d) => (
                  <option key={d} value={d}>
                    {DISPOSITION_LABELS[d]}
                  </option>
                ))}
              </select>
            </div>
            <div className="min-w-[20rem] flex-1">
              <label htmlFor="nc-comment">Why (required)</label>
              <input id="nc-comment" value={comment} onChange={(e) => setComment(e.target.value)} maxLength={2000} />
            </div>
            <button type="button" className="btn" onClick={() => start('disposition')}>
              Sign the disposition of {selected.size} job(s)…
            </button>
          </div>
        </div>
      )}
      {canClose && activeHolds.length === 0 && (
        <button type="button" className="btn-quiet" onClick={() => start('close')}>
          Sign and close the nonconformance…
        </button>
      )}
      {error && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ </strong>
          {error}
        </p>
      )}
      {signing && (
        <SignDialog
          title={
            signing === 'close' ? `Close nonconformance ${ncId}` : `${DISPOSITION_LABELS[disposition]}: ${jobs.length} job(s)`
          }
          meaningOptions={[...HOLD_SIGN_MEANINGS]}
          onSign={sign}
          onCancel={() => setSigning(null)}
          signLabel="Sign"
        >
          {signing === 'disposition' && <p className="text-sm num">{jobs.join(', ')}</p>}
          {comment.trim() && <p className="text-sm">{comment.trim()}</p>}
        </SignDialog>
      )}
    </div>
  );
}
