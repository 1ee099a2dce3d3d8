/**
 * "Refused messages": what the ingest worker did not store and why, newest first. Filter by
 * reason (server side) and by text (topic, device, detail, payload; in the browser), sort by
 * any column, page back, open a row to read the raw payload, export what is shown as CSV.
 */
import { Fragment, useCallback, useEffect, useMemo, useState } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { toCsv } from '../../lib/shared/csv-table.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { REJECTION_LABELS, REJECTION_REASONS, type RejectionReason, type RejectionRow } from '../../lib/shared/telemetry.ts';

interface Props {
  timeZone: string;
  /** Refused messages per reason in the last 24 h (server-rendered summary). */
  counts: Record<string, number>;
}

type SortKey = 'receivedAtMs' | 'reason' | 'topic' | 'deviceUsername';
const PAGE = 200;

export default function RefusedMessages({ timeZone, counts }: Props) {
  const [reason, setReason] = useState<RejectionReason | ''>('');
  const [text, setText] = useState('');
  const [rows, setRows] = useState<RejectionRow[]>([]);
  const [nextBefore, setNextBefore] = useState<number | null>(null);
  const [state, setState] = useState<'loading' | 'ready' | 'error'>('loading');
  const [error, setError] = useState<string | null>(null);
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: 'receivedAtMs', dir: -1 });
  const [open, setOpen] = useState<number | null>(null);

  const load = useCallback(
    async (before: number | null) => {
      setState('loading');
      setError(null);
      const qs = new URLSearchParams({ limit: String(PAGE) });
      if (reason) qs.set('reason', reason);
      if (before) qs.set('before', String(before));
      try {
        const r = await apiFetch<{ items: RejectionRow[]; nextBefore: number | null }>(`/api/v1/ingest/rejections?${qs}`);
        setRows((prev) => (before ? [...prev, ...r.items] : r.items));
        setNextBefore(r.nextBefore);
        setState('ready');
      } catch (e) {
        setError(e instanceof ApiError ? `${e.title}${e.detail ? `: ${e.detail}` : ''}` : 'The list could not be loaded.');
        setState('error');
      }
    },
    [reason],
  );

  useEffect(() => {
    void load(null);
  }, [load]);

  const shown = useMemo(() => {
    const needle = text.trim().toLowerCase();
    const filtered = needle
      ? rows.filter((r) =>
          [r.topic, r.deviceUsername ?? '', r.detail ?? '', r.payload, REJECTION_LABELS[r.reason]].some((s) =>
            s.toLowerCase().includes(needle),
          ),
        )
      : rows;
    const k = sort.key;
    return [...filtered].sort((a, b) => {
      const x = a[k] ?? '';
      const y = b[k] ?? '';
      return (x < y ? -1 : x > y ? 1 : b.id - a.id) * sort.dir;
    });
  }, [rows, text, sort]);

  function exportCsv() {
    const csv = toCsv(
      ['received', 'reason', 'topic', 'device', 'channel_id', 'detail', 'payload'],
      shown.map((r) => [
        new Date(r.receivedAtMs).toISOString(),
        r.reason,
        r.topic,
        r.deviceUsername,
        r.channelId,
        r.detail,
        r.payload,
      ]),
    );
    const url = URL.createObjectURL(new Blob([csv], { type: 'text/csv;charset=utf-8' }));
    const a = document.createElement('a');
    a.href = url;
    a.download = `refused-messages-${new Date().toISOString().slice(0, 19).replace(/:/g, '')}.csv`;
    a.click();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  }

  const header = (key: SortKey, label: string) => (
    <th aria-sort={sort.key === key ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none'}>
      <button
        type="button"
        className="font-bold text-ink-soft hover:underline"
        onClick={() => setSort((s) => ({ key, dir: s.key === key ? (-s.dir as 1 | -1) : key === 'receivedAtMs' ? -1 : 1 }))}
      >
        {label} {sort.key === key ? (sort.dir === 1 ? '▲' : '▼') : ''}
      </button>
    </th>
  );

  const total24h = Object.values(counts).reduce((a, b) => a + b, 0);

  return (
    <section aria-labelledby="refused-h" className="panel">
      <h2 id="refused-h">Refused messages</h2>
      <p className="mt-1 text-sm text-ink-soft">
        {total24h === 0
          ? 'Nothing was refused in the last 24 hours.'
          : `${total24h} refused in the last 24 hours: ` +
            Object.entries(counts)
              .sort((a, b) => b[1] - a[1])
              .map(([r, n]) => `${REJECTION_LABELS[r as RejectionReason] ?? r} ${n}`)
              .join(' · ')}
      </p>
      <div className="mt-3 flex flex-wrap items-end gap-3">
        <div className="w-64">
          <label htmlFor="rj-reason">Reason</label>
          <select id="rj-reason" value={reason} onChange={(e) => setReason(e.target.value as RejectionReason | '')}>
            <option value="">Every reason</option>
            {REJECTION_REASONS.map((r) => (
              <option key={r} value={r}>
                {REJECTION_LABELS[r]}
              </option>
            ))}
          </select>
        </div>
        <div className="w-80">
          <label htmlFor="rj-text">Find in topic, device, detail or payload</label>
          <input id="rj-text" type="search" value={text} onChange={(e) => setText(e.target.value)} />
        </div>
        <button type="button" className="btn-quiet" onClick={() => void load(null)} disabled={state === 'loading'}>
          Refresh
        </button>
        <button type="button" className="btn-quiet" onClick={exportCsv} disabled={shown.length === 0}>
          Export CSV ({shown.length})
        </button>
      </div>
      {state === 'error' && (
        <p role="alert" className="caution mt-3">
          {error}{' '}
          <button type="button" className="btn-quiet ml-2" onClick={() => void load(null)}>
            Try again
          </button>
        </p>
      )}
      {state === 'loading' && rows.length === 0 && (
        <p role="status" className="mt-3 text-sm text-ink-soft">
          Loading refused messages…
        </p>
      )}
      {state !== 'loading' && state !== 'error' && shown.length === 0 && (
        <div className="empty mt-3" role="status">
          {rows.length === 0
            ? 'No refused messages' + (reason ? ` with reason “${REJECTION_LABELS[reason]}”.` : '.')
            : 'No loaded message matches the text.'}
        </div>
      )}
      {shown.length > 0 && (
        <div className="mt-3 overflow-x-auto">
          <table>
            <caption className="sr-only">
              Refused messages, {sort.key} {sort.dir === 1 ? 'ascending' : 'descending'}
            </caption>
            <thead>
              <tr>
                {header('receivedAtMs', `Received (${timeZone})`)}
                {header('reason', 'Reason')}
                {header('deviceUsername', 'Device')}
                {header('topic', 'Topic')}
                <th>Detail</th>
                <th>
                  <span className="sr-only">Payload</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {shown.map((r) => (
                <Fragment key={r.id}>
                  <tr>
                    <td className="num whitespace-nowrap">{formatSiteTime(r.receivedAtMs, timeZone, { seconds: true })}</td>
                    <td>
                      <span className="tag border-slate-line">{REJECTION_LABELS[r.reason] ?? r.reason}</span>
                    </td>
                    <td className="num whitespace-nowrap">{r.deviceUsername ?? '—'}</td>
                    <td className="num break-all">{r.topic}</td>
                    <td className="max-w-md">{r.detail ?? ''}</td>
                    <td>
                      <button
                        type="button"
                        className="btn-quiet text-xs"
                        aria-expanded={open === r.id}
                        aria-controls={`rj-p-${r.id}`}
                        onClick={() => setOpen((o) => (o === r.id ? null : r.id))}
                      >
                        {open === r.id ? 'Hide payload' : 'Payload'}
                      </button>
                    </td>
                  </tr>
                  {open === r.id && (
                    <tr id={`rj-p-${r.id}`}>
                      <td colSpan={6}>
                        <pre className="num max-h-64 overflow-auto whitespace-pre-wrap break-all rounded bg-slate-panel p-2 text-xs">
                          {r.payload || '(empty payload)'}
                        </pre>
                      </td>
                    </tr>
                  )}
                </Fragment>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {nextBefore !== null && (
        <div className="mt-3">
          <button type="button" className="btn-quiet" onClick={() => void load(nextBefore)} disabled={state === 'loading'}>
            {state === 'loading' ? 'Loading…' : `Load ${PAGE} older`}
          </button>
        </div>
      )}
    </section>
  );
}
