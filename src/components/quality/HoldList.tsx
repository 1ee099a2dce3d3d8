/**
 * The hold list: select held jobs and release them or decide their disposition (strip and
 * re-coat, scrap, use as is). Closing a hold is an electronic signature (password + meaning);
 * the signature's printed name, time and meaning are shown with every closed hold.
 */
import { useMemo, useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import { DISPOSITIONS, DISPOSITION_LABELS, HOLD_SIGN_MEANINGS, type Disposition } from '../../lib/shared/quality.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import type { HoldItem } from '../../lib/shared/trace-views.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';
import SignDialog from '../shell/SignDialog.tsx';
import { JobStatusTag } from './marks.tsx';

type Key = 'job' | 'placed' | 'reason' | 'status' | 'closed';

export default function HoldList({
  initial,
  timeZone,
  canRelease,
}: {
  initial: HoldItem[];
  timeZone: string;
  canRelease: boolean;
}) {
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [text, setText] = useState('');
  const [disposition, setDisposition] = useState<Disposition>('release');
  const [comment, setComment] = useState('');
  const [signing, setSigning] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const { sort, toggle } = useSort<Key>({ key: 'placed', dir: -1 });
  const t = (s: string | null) => formatSiteTime(s, timeZone);

  const shown = useMemo(() => {
    const q = text.trim().toLowerCase();
    const f = q
      ? initial.filter((h) =>
          [h.jobNumber, h.reason, h.placedBy ?? '', h.disposition ?? ''].some((s) => s.toLowerCase().includes(q)),
        )
      : initial;
    return sortRows(
      f,
      (h) => ({ job: h.jobNumber, placed: h.placedAt, reason: h.reason, status: h.status, closed: h.closedAt })[sort.key],
      sort.dir,
    );
  }, [initial, text, sort]);
  const active = shown.filter((h) => h.status === 'active');
  const chosen = initial.filter((h) => selected.has(h.id));

  const toggleOne = (id: number) =>
    setSelected((cur) => {
      const next = new Set(cur);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });

  function start() {
    setError(null);
    if (chosen.length === 0) return setError('Select at least one held job.');
    if (disposition !== 'release' && comment.trim().length < 3)
      return setError('Say why in the comment: a disposition other than release needs one.');
    setSigning(true);
  }

  async function sign(password: string, meaning: string) {
    await apiFetch('/api/v1/holds/close', {
      body: { holdIds: chosen.map((h) => h.id), disposition, comment: comment.trim(), password, meaning },
    });
    setSigning(false);
    setDone(`${chosen.length} hold(s) closed: ${DISPOSITION_LABELS[disposition]}.`);
    setTimeout(() => window.location.reload(), 900);
  }

  const csv = () =>
    downloadCsv(
      'holds.csv',
      [
        'hold',
        'job',
        'status',
        'reason',
        `placed (${timeZone})`,
        'placed by',
        'disposition',
        'comment',
        `closed (${timeZone})`,
        'signed by',
        'meaning',
      ],
      shown.map((h) => [
        h.id,
        h.jobNumber,
        h.status,
        h.reason,
        t(h.placedAt),
        h.placedBy ?? '',
        h.disposition ? DISPOSITION_LABELS[h.disposition] : '',
        h.dispositionComment ?? '',
        h.closedAt ? t(h.closedAt) : '',
        h.signature?.displayName ?? '',
        h.signature?.meaning ?? '',
      ]),
    );

  return (
    <div className="space-y-3">
      {canRelease && active.length > 0 && (
        <div className="panel space-y-2" role="group" aria-labelledby="rel-h">
          <h2 id="rel-h">Release or disposition the selected holds</h2>
          <div className="flex flex-wrap items-end gap-3">
            <div>
              <label htmlFor="disp">Disposition</label>
              <select
                id="disp"
                value={disposition}
                onChange={(e) => setDisposition(e.target.value as Disposition)}
                className="w-64"
              >
                {DISPOSITIONS.map((d) => (
                  <option value={d} key={d}>
                    {DISPOSITION_LABELS[d]}
                  </option>
                ))}
              </select>
            </div>
            <div className="min-w-[20rem] flex-1">
              <label htmlFor="disp-comment">Comment {disposition === 'release' ? '(optional)' : '(required)'}</label>
              <input id="disp-comment" value={comment} onChange={(e) => setComment(e.target.value)} maxLength={2000} />
            </div>
            <button type="button" className="btn" onClick={start}>
              Sign and close {chosen.length} hold{chosen.length === 1 ? '' : 's'}…
            </button>
          </div>
          <p className="text-xs text-ink-soft">
            Closing a hold is an electronic signature: you enter your password again and choose what your signature means.
          </p>
          {error && (
            <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
              <strong>✕ </strong>
              {error}
            </p>
          )}
          {done && (
            <p role="status" className="rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm">
              <strong>✓ </strong>
              {done}
            </p>
          )}
        </div>
      )}
      {signing && (
        <SignDialog
          title={`${DISPOSITION_LABELS[disposition]}: ${chosen.length} held job(s)`}
          meaningOptions={[...HOLD_SIGN_MEANINGS]}
          onSign={sign}
          onCancel={() => setSigning(false)}
          signLabel="Sign and close"
        >
          <p className="text-sm">
            Jobs: <span className="num">{chosen.map((h) => h.jobNumber).join(', ')}</span>
          </p>
          {comment.trim() && <p className="text-sm">Comment: {comment.trim()}</p>}
        </SignDialog>
      )}
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="hold-q">Filter the rows shown</label>
          <input
            id="hold-q"
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            className="w-64"
            placeholder="job, reason…"
          />
        </div>
        {canRelease && active.length > 0 && (
          <button type="button" className="btn-quiet" onClick={() => setSelected(new Set(active.map((h) => h.id)))}>
            Select all {active.length} active shown
          </button>
        )}
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV of these {shown.length} rows
        </button>
      </div>
      {shown.length === 0 ? (
        <div className="empty" role="status">
          No holds here.
        </div>
      ) : (
        <div className="max-h-[40rem] overflow-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead className="sticky top-0">
              <tr>
                {canRelease && (
                  <th scope="col">
                    <span className="sr-only">Select</span>
                  </th>
                )}
                <SortTh k="job" sort={sort} toggle={toggle}>
                  Job
                </SortTh>
                <SortTh k="status" sort={sort} toggle={toggle}>
                  Status
                </SortTh>
                <SortTh k="reason" sort={sort} toggle={toggle}>
                  Reason
                </SortTh>
                <SortTh k="placed" sort={sort} toggle={toggle}>
                  Placed ({timeZone})
                </SortTh>
                <SortTh k="closed" sort={sort} toggle={toggle}>
                  Closed / signature
                </SortTh>
              </tr>
            </thead>
            <tbody>
              {shown.map((h) => (
                <tr key={h.id}>
                  {canRelease && (
                    <td>
                      {h.status === 'active' && (
                        <input
                          type="checkbox"
                          className="w-auto"
                          aria-label={`Select hold of ${h.jobNumber}`}
                          checked={selected.has(h.id)}
                          onChange={() => toggleOne(h.id)}
                        />
                      )}
                    </td>
                  )}
                  <td className="num whitespace-nowrap">
                    <a href={`/quality/trace/${encodeURIComponent(h.jobNumber)}`}>{h.jobNumber}</a>
                  </td>
                  <td>
                    <JobStatusTag status={h.jobStatus} />
                  </td>
                  <td className="text-sm">
                    {h.reason}
                    {h.ncId && (
                      <div className="text-xs">
                        <a href={`/quality/nonconformances/${h.ncId}`}>Nonconformance {h.ncId}</a>
                      </div>
                    )}
                  </td>
                  <td className="num text-sm">
                    {t(h.placedAt)}
                    <div className="text-xs text-ink-soft">{h.placedBy}</div>
                  </td>
                  <td className="text-sm">
                    {h.status === 'closed' ? (
                      <>
                        <strong>{h.disposition ? DISPOSITION_LABELS[h.disposition] : ''}</strong>
                        {h.dispositionComment ? ` — ${h.dispositionComment}` : ''}
                        <div className="text-xs text-ink-soft">
                          Signed by {h.signature?.displayName} ({h.signature?.meaning}){' '}
                          {h.signature ? t(h.signature.signedAt) : ''}
                        </div>
                      </>
                    ) : (
                      <span className="text-ink-soft">active</span>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
