/**
 * Actions on one load (not printed): scan jobs or racks into an open load, close it by hand,
 * recompute a closed load's record, print. The scan box takes a barcode scanner's input (one
 * code per line; the scanner's Enter ends a line) or typed numbers separated by commas/spaces.
 */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { parseJobList } from '../../lib/shared/jobs.ts';

export interface LoadActionsProps {
  loadId: number;
  status: 'open' | 'closed';
  canManage: boolean;
  canRecompute: boolean;
}

type Msg = { kind: 'ok' | 'error'; text: string } | null;

function errText(e: unknown): string {
  if (e instanceof ApiError) return e.errors.length ? e.errors.map((f) => f.message).join(' ') : (e.detail ?? e.title);
  return e instanceof Error ? e.message : 'Something went wrong.';
}

export default function LoadActions({ loadId, status, canManage, canRecompute }: LoadActionsProps) {
  const [scan, setScan] = useState('');
  const [asRacks, setAsRacks] = useState(false);
  const [busy, setBusy] = useState<string | null>(null);
  const [msg, setMsg] = useState<Msg>(null);
  const parsed = parseJobList(scan);

  async function addJobs(e: SyntheticEvent) {
    e.preventDefault();
    if (parsed.invalid.length)
      return setMsg({
        kind: 'error',
        text: `Not a job or rack code: ${parsed.invalid.map((x) => `line ${x.line} “${x.value}”`).join(', ')}.`,
      });
    if (!parsed.jobNumbers.length) return setMsg({ kind: 'error', text: 'Scan or type at least one code.' });
    setBusy('scan');
    try {
      const r = await apiFetch<{ added: string[]; alreadyInLoad: string[]; unknownRacks: string[] }>(
        `/api/v1/loads/${loadId}/jobs`,
        {
          body: asRacks ? { rackCodes: parsed.jobNumbers } : { jobNumbers: parsed.jobNumbers },
        },
      );
      setScan('');
      const parts = [`${r.added.length} job(s) added`];
      if (r.alreadyInLoad.length) parts.push(`${r.alreadyInLoad.length} already in this load`);
      if (r.unknownRacks.length) parts.push(`no dip run found for rack(s) ${r.unknownRacks.join(', ')}`);
      setMsg({ kind: r.unknownRacks.length ? 'error' : 'ok', text: parts.join('; ') + '.' });
      if (r.added.length) setTimeout(() => window.location.reload(), 600);
    } catch (err) {
      setMsg({ kind: 'error', text: errText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function post(what: 'close' | 'recompute') {
    if (
      what === 'close' &&
      !window.confirm('Close this load now? Its cure record will be computed from the readings stored so far.')
    )
      return;
    setBusy(what);
    setMsg(null);
    try {
      await apiFetch(`/api/v1/loads/${loadId}/${what}`, { body: {} });
      window.location.reload();
    } catch (err) {
      setMsg({ kind: 'error', text: errText(err) });
      setBusy(null);
    }
  }

  return (
    <div className="no-print space-y-3">
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn-quiet" onClick={() => window.print()}>
          Print the record
        </button>
        {status === 'open' && canManage && (
          <button type="button" className="btn-quiet" disabled={busy !== null} onClick={() => post('close')}>
            {busy === 'close' ? 'Closing…' : 'Close the load now'}
          </button>
        )}
        {status === 'closed' && canRecompute && (
          <button type="button" className="btn-quiet" disabled={busy !== null} onClick={() => post('recompute')}>
            {busy === 'recompute' ? 'Recomputing…' : 'Recompute the record'}
          </button>
        )}
      </div>
      {status === 'open' && canManage && (
        <form onSubmit={addJobs} className="panel space-y-2" aria-labelledby="scan-h">
          <h2 id="scan-h">Scan into this load</h2>
          <fieldset className="flex gap-4 text-sm">
            <legend className="sr-only">What you scan</legend>
            <label className="flex items-center gap-1 font-normal">
              <input type="radio" className="w-auto" checked={!asRacks} onChange={() => setAsRacks(false)} /> Job tickets
            </label>
            <label className="flex items-center gap-1 font-normal">
              <input type="radio" className="w-auto" checked={asRacks} onChange={() => setAsRacks(true)} /> Racks / trays (all
              jobs of the rack’s last dip)
            </label>
          </fieldset>
          <label htmlFor="scan-box">
            {asRacks ? 'Rack codes' : 'Job numbers'} — one per line (scanner) or separated by commas
          </label>
          <textarea
            id="scan-box"
            rows={4}
            value={scan}
            onChange={(e) => setScan(e.target.value)}
            className="font-mono"
            autoComplete="off"
            spellCheck={false}
          />
          <p className="text-xs text-ink-soft" aria-live="polite">
            {parsed.jobNumbers.length} code(s) read
            {parsed.duplicates.length ? `, ${parsed.duplicates.length} repeated (kept once)` : ''}
            {parsed.invalid.length ? `, ${parsed.invalid.length} not valid` : ''}.
          </p>
          <button className="btn" disabled={busy !== null}>
            {busy === 'scan' ? 'Adding…' : 'Add to load'}
          </button>
        </form>
      )}
      {msg && (
        <p
          role={msg.kind === 'error' ? 'alert' : 'status'}
          className={
            msg.kind === 'error'
              ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
              : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
          }
        >
          <strong>{msg.kind === 'error' ? '✕ ' : '✓ '}</strong>
          {msg.text}
        </p>
      )}
    </div>
  );
}
