/**
 * The oven-load list: sortable columns, a quick filter on what is shown, CSV of the rows shown,
 * live refresh when a load opens, changes phase or closes (`loads` events), and — for the floor
 * roles — opening a load by hand.
 */
import { useEffect, useMemo, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError, subscribeLive } from '../../lib/client/api.ts';
import { VERDICT_LABELS } from '../../lib/shared/jobs.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import type { LoadListItem, OvenRow } from '../../lib/shared/trace-views.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';
import { PhaseTag, VerdictBadge } from '../quality/marks.tsx';

export interface LoadTableProps {
  initial: LoadListItem[];
  timeZone: string;
  /** The page's query string (server-side filters), reused for live refreshes. */
  query: string;
  ovens: OvenRow[];
  canManage: boolean;
}

type Key = 'id' | 'oven' | 'opened' | 'closed' | 'status' | 'verdict' | 'jobs' | 'eq' | 'peak';

export default function LoadTable({ initial, timeZone, query, ovens, canManage }: LoadTableProps) {
  const [rows, setRows] = useState(initial);
  const [text, setText] = useState('');
  const [live, setLive] = useState<'connecting' | 'live' | 'off'>('connecting');
  const { sort, toggle } = useSort<Key>({ key: 'opened', dir: -1 });
  const [ovenId, setOvenId] = useState<number>(ovens[0]?.id ?? 0);
  const [opening, setOpening] = useState(false);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    let timer: ReturnType<typeof setTimeout> | null = null;
    const refresh = () => {
      if (timer) return;
      timer = setTimeout(() => {
        timer = null;
        apiFetch<LoadListItem[]>(`/api/v1/loads?${query}`).then(setRows, () => setLive('off'));
      }, 800);
    };
    const stop = subscribeLive(['loads'], () => {
      setLive('live');
      refresh();
    });
    setLive('live');
    return () => {
      stop();
      if (timer) clearTimeout(timer);
    };
  }, [query]);

  const shown = useMemo(() => {
    const q = text.trim().toLowerCase();
    const f = q
      ? rows.filter((r) =>
          [String(r.id), r.ovenCode, r.ovenName, r.verdict ?? '', r.status, r.windowName ?? ''].some((s) =>
            s.toLowerCase().includes(q),
          ),
        )
      : rows;
    const get = (r: LoadListItem) =>
      ({
        id: r.id,
        oven: r.ovenCode,
        opened: r.openedAt,
        closed: r.closedAt,
        status: r.status,
        verdict: r.verdict,
        jobs: r.jobs,
        eq: r.equivalentMinutes,
        peak: r.peakC,
      })[sort.key];
    return sortRows(f, get, sort.dir);
  }, [rows, text, sort]);

  async function open(e: SyntheticEvent) {
    e.preventDefault();
    setOpening(true);
    setError(null);
    try {
      const load = await apiFetch<{ id: number }>('/api/v1/loads', { body: { ovenAssetId: ovenId } });
      window.location.href = `/loads/${load.id}`;
    } catch (err) {
      setError(err instanceof ApiError ? (err.detail ?? err.title) : 'The load could not be opened.');
      setOpening(false);
    }
  }

  const t = (s: string | null) => formatSiteTime(s, timeZone);
  const csv = () =>
    downloadCsv(
      'oven-loads.csv',
      [
        'load',
        'oven',
        `opened (${timeZone})`,
        `closed (${timeZone})`,
        'status',
        'phase',
        'verdict',
        'jobs',
        'equivalent min',
        'peak °C',
        'door openings',
        'data gaps',
        'window',
      ],
      shown.map((r) => [
        r.id,
        r.ovenCode,
        t(r.openedAt),
        t(r.closedAt),
        r.status,
        r.phase ?? '',
        r.verdict ? VERDICT_LABELS[r.verdict] : '',
        r.jobs,
        r.equivalentMinutes?.toFixed(1) ?? '',
        r.peakC?.toFixed(1) ?? '',
        r.doorOpenings ?? '',
        r.gaps ?? '',
        r.windowName ? `${r.windowName} v${r.windowVersion}` : '',
      ]),
    );

  return (
    <div className="space-y-3">
      {canManage && (
        <form onSubmit={open} className="panel flex flex-wrap items-end gap-3 py-3" aria-label="Open a load by hand">
          <div>
            <label htmlFor="open-oven">Open a load by hand on</label>
            <select id="open-oven" value={ovenId} onChange={(e) => setOvenId(Number(e.target.value))} className="w-56">
              {ovens.map((o) => (
                <option value={o.id} key={o.id}>
                  {o.name}
                </option>
              ))}
            </select>
          </div>
          <button className="btn" disabled={opening || !ovenId}>
            {opening ? 'Opening…' : 'Open load'}
          </button>
          <p className="text-xs text-ink-soft">
            Loads also open by themselves when an oven’s setpoint rises by 50 °C or more, and close when it falls back and the
            oven has cooled.
          </p>
          {error && (
            <p role="alert" className="w-full rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
              <strong>✕ </strong>
              {error}
            </p>
          )}
        </form>
      )}
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="load-q">Filter the rows shown</label>
          <input
            id="load-q"
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            placeholder="load, oven, verdict…"
            className="w-64"
          />
        </div>
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV of these {shown.length} rows
        </button>
        <span className="text-xs text-ink-soft" aria-live="polite">
          {live === 'live'
            ? '● live: open loads update by themselves'
            : live === 'off'
              ? '○ live updates paused — reload the page'
              : '…'}
        </span>
      </div>
      {shown.length === 0 ? (
        <div className="empty" role="status">
          No oven loads match.{' '}
          {rows.length > 0 ? 'Clear the filter.' : 'Loads appear here when an oven starts a cycle or an operator opens one.'}
        </div>
      ) : (
        <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead>
              <tr>
                <SortTh k="id" sort={sort} toggle={toggle}>
                  Load
                </SortTh>
                <SortTh k="oven" sort={sort} toggle={toggle}>
                  Oven
                </SortTh>
                <SortTh k="opened" sort={sort} toggle={toggle}>
                  Opened ({timeZone})
                </SortTh>
                <SortTh k="closed" sort={sort} toggle={toggle}>
                  Closed
                </SortTh>
                <SortTh k="status" sort={sort} toggle={toggle}>
                  Phase
                </SortTh>
                <SortTh k="verdict" sort={sort} toggle={toggle}>
                  Verdict
                </SortTh>
                <SortTh k="eq" sort={sort} toggle={toggle} className="text-right">
                  Equivalent min
                </SortTh>
                <SortTh k="peak" sort={sort} toggle={toggle} className="text-right">
                  Peak °C
                </SortTh>
                <th scope="col">Door / gaps</th>
                <SortTh k="jobs" sort={sort} toggle={toggle} className="text-right">
                  Jobs
                </SortTh>
              </tr>
            </thead>
            <tbody>
              {shown.map((r) => (
                <tr key={r.id} className={r.verdict && r.verdict !== 'complete' ? 'bg-alert-bg/40' : ''}>
                  <td className="num">
                    <a href={`/loads/${r.id}`}>{r.id}</a>
                  </td>
                  <td>{r.ovenName}</td>
                  <td className="num">{t(r.openedAt)}</td>
                  <td className="num">{r.closedAt ? t(r.closedAt) : '—'}</td>
                  <td>{r.status === 'open' ? <PhaseTag phase={r.phase} /> : <span className="text-ink-soft">closed</span>}</td>
                  <td>
                    <VerdictBadge verdict={r.verdict} status={r.status} />
                  </td>
                  <td className="num text-right">{r.equivalentMinutes === null ? '—' : r.equivalentMinutes.toFixed(1)}</td>
                  <td className="num text-right">{r.peakC === null ? '—' : r.peakC.toFixed(1)}</td>
                  <td className="num text-sm">
                    {r.doorOpenings ?? '—'} / {r.gaps ?? '—'}
                  </td>
                  <td className="num text-right">{r.jobs}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="text-xs text-ink-soft">
        Equivalent minutes: Arrhenius-equivalent minutes at the window’s reference temperature (the equivalent-age form of ASTM
        C1074). Door / gaps: door openings and stretches without oven data during the load.
      </p>
    </div>
  );
}
