/**
 * The audit trail: filter by actor, action, entity and date range (site time zone), page
 * through, sort the page by any column, open a row to compare before → after, and export every
 * matching row as CSV (server side).
 */
import { Fragment, useCallback, useEffect, useMemo, useState, type SubmitEvent } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import type { AuditPage, AuditRowView } from '../../lib/shared/admin.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { NoticeLine, problemText, SortTh, sortRows, useSort, type Notice } from '../admin/table.tsx';

interface Filters {
  actor: string;
  action: string;
  entity: string;
  entityId: string;
  from: string;
  to: string;
}

interface Props {
  initial: AuditPage;
  initialFilters: Filters;
  timeZone: string;
  entities: string[];
  actions: string[];
}

type Key = 'at' | 'actor' | 'action' | 'entity' | 'entityId' | 'address';

function query(f: Filters, page: number, pageSize: number, format?: 'csv'): string {
  const qs = new URLSearchParams();
  for (const [k, v] of Object.entries(f)) if (v.trim()) qs.set(k, v.trim());
  if (format) qs.set('format', format);
  else {
    qs.set('page', String(page));
    qs.set('pageSize', String(pageSize));
  }
  return qs.toString();
}

/** Fields that differ between before and after (top level), for the change column. */
function changedKeys(before: unknown, after: unknown): string[] {
  const b = before && typeof before === 'object' ? (before as Record<string, unknown>) : {};
  const a = after && typeof after === 'object' ? (after as Record<string, unknown>) : {};
  return [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k]));
}

const show = (v: unknown) => (v === undefined ? '—' : typeof v === 'string' ? v : JSON.stringify(v));

function Change({ row }: { row: AuditRowView }) {
  const keys = changedKeys(row.before, row.after);
  if (row.before == null && row.after == null) return <span className="text-ink-faint">—</span>;
  if (keys.length === 0) return <span className="text-ink-faint">no field changed</span>;
  return <span className="text-ink-soft">{keys.slice(0, 4).join(', ') + (keys.length > 4 ? ` +${keys.length - 4}` : '')}</span>;
}

function Detail({ row, timeZone }: { row: AuditRowView; timeZone: string }) {
  const b = row.before && typeof row.before === 'object' ? (row.before as Record<string, unknown>) : null;
  const a = row.after && typeof row.after === 'object' ? (row.after as Record<string, unknown>) : null;
  const keys = [...new Set([...Object.keys(b ?? {}), ...Object.keys(a ?? {})])];
  return (
    <div className="space-y-2 bg-paper/60 p-3 text-sm">
      {row.signature && (
        <p className="rounded border border-slate-line bg-white p-2">
          <strong>Signed</strong> by {row.signature.displayName} ({row.signature.username}) on{' '}
          {formatSiteTime(row.signature.signedAt, timeZone, { seconds: true })} — meaning:{' '}
          <strong>{row.signature.meaning}</strong>
        </p>
      )}
      {keys.length > 0 ? (
        <table className="bg-white">
          <thead>
            <tr>
              <th scope="col">Field</th>
              <th scope="col">Before</th>
              <th scope="col">After</th>
            </tr>
          </thead>
          <tbody>
            {keys.map((k) => {
              const changed = JSON.stringify(b?.[k]) !== JSON.stringify(a?.[k]);
              return (
                <tr key={k}>
                  <td className="font-mono">
                    {changed && <span aria-label="changed">● </span>}
                    {k}
                  </td>
                  <td className="break-all font-mono text-[13px]">{b ? show(b[k]) : '—'}</td>
                  <td className="break-all font-mono text-[13px]">{a ? show(a[k]) : '—'}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      ) : (
        <p className="font-mono text-[13px]">
          before: {show(row.before)} · after: {show(row.after)}
        </p>
      )}
    </div>
  );
}

export default function AuditTrail({ initial, initialFilters, timeZone, entities, actions }: Props) {
  const [filters, setFilters] = useState<Filters>(initialFilters);
  const [applied, setApplied] = useState<Filters>(initialFilters);
  const [page, setPage] = useState(initial);
  const [pageSize, setPageSize] = useState(initial.pageSize);
  const [loading, setLoading] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);
  const [open, setOpen] = useState<number | null>(null);
  const { sort, toggle } = useSort<Key>({ key: 'at', dir: -1 });

  const load = useCallback(async (f: Filters, p: number, size: number) => {
    setLoading(true);
    try {
      const r = await apiFetch<AuditPage>(`/api/v1/audit?${query(f, p, size)}`);
      setPage(r);
      setApplied(f);
      setNotice(null);
      window.history.replaceState(null, '', `?${query(f, p, size)}`);
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setLoading(false);
    }
  }, []);

  useEffect(() => setOpen(null), [page]);

  const rows = useMemo(() => sortRows(page.rows, (r) => (sort.key === 'at' ? r.id : r[sort.key]), sort.dir), [page, sort]);
  const pages = Math.max(1, Math.ceil(page.total / page.pageSize));

  function submit(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    void load(filters, 1, pageSize);
  }

  const input = (k: keyof Filters, label: string, extra: Record<string, unknown> = {}) => (
    <div>
      <label htmlFor={`af-${k}`}>{label}</label>
      <input id={`af-${k}`} value={filters[k]} onChange={(e) => setFilters({ ...filters, [k]: e.target.value })} {...extra} />
    </div>
  );

  return (
    <div className="space-y-3">
      <form
        onSubmit={submit}
        className="panel grid grid-cols-2 items-end gap-3 md:grid-cols-4 xl:grid-cols-8"
        aria-label="Filter the audit trail"
      >
        {input('actor', 'Who', { placeholder: 'username' })}
        {input('action', 'Action contains', { placeholder: 'e.g. role, signed', list: 'af-actions' })}
        <div>
          <label htmlFor="af-entity">Record type</label>
          <select id="af-entity" value={filters.entity} onChange={(e) => setFilters({ ...filters, entity: e.target.value })}>
            <option value="">any</option>
            {entities.map((x) => (
              <option key={x} value={x}>
                {x}
              </option>
            ))}
          </select>
        </div>
        {input('entityId', 'Record id')}
        {input('from', `From (${timeZone})`, { type: 'date' })}
        {input('to', 'To (inclusive)', { type: 'date' })}
        <div>
          <label htmlFor="af-size">Rows a page</label>
          <select id="af-size" value={pageSize} onChange={(e) => setPageSize(Number(e.target.value))}>
            {[25, 50, 100, 200, 500].map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </select>
        </div>
        <div className="flex gap-2">
          <button className="btn" type="submit" disabled={loading} aria-busy={loading}>
            {loading ? 'Loading…' : 'Apply'}
          </button>
          <button
            type="button"
            className="btn-quiet"
            onClick={() => {
              const none = { actor: '', action: '', entity: '', entityId: '', from: '', to: '' };
              setFilters(none);
              void load(none, 1, pageSize);
            }}
          >
            Clear
          </button>
        </div>
        <datalist id="af-actions">
          {actions.map((a) => (
            <option key={a} value={a} />
          ))}
        </datalist>
      </form>

      <div className="flex flex-wrap items-center gap-3">
        <p className="mr-auto text-sm text-ink-soft" aria-live="polite">
          {page.total === 0
            ? 'No entries match.'
            : `Entries ${(page.page - 1) * page.pageSize + 1}–${Math.min(page.total, page.page * page.pageSize)} of ${page.total}, newest first. Sorting a column sorts this page.`}
        </p>
        <a className="btn-quiet" href={`/api/v1/audit?${query(applied, 1, pageSize, 'csv')}`} download>
          Export all {page.total} as CSV
        </a>
      </div>
      <NoticeLine notice={notice} onClose={() => setNotice(null)} />

      <div
        className={`overflow-x-auto rounded-md border border-slate-line bg-white ${loading ? 'opacity-60' : ''}`}
        aria-busy={loading}
      >
        <table>
          <thead>
            <tr>
              <SortTh k="at" sort={sort} toggle={toggle}>
                When ({timeZone})
              </SortTh>
              <SortTh k="actor" sort={sort} toggle={toggle}>
                Who
              </SortTh>
              <SortTh k="action" sort={sort} toggle={toggle}>
                Action
              </SortTh>
              <SortTh k="entity" sort={sort} toggle={toggle}>
                Record
              </SortTh>
              <SortTh k="entityId" sort={sort} toggle={toggle}>
                Id
              </SortTh>
              <th scope="col">Changed</th>
              <th scope="col">Signed</th>
              <SortTh k="address" sort={sort} toggle={toggle}>
                From address
              </SortTh>
              <th scope="col">
                <span className="sr-only">Details</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {rows.length === 0 && (
              <tr>
                <td colSpan={9} className="text-ink-soft">
                  No audit entries match these filters.
                </td>
              </tr>
            )}
            {rows.map((r) => (
              <Fragment key={r.id}>
                <tr>
                  <td className="num whitespace-nowrap">{formatSiteTime(r.at, timeZone, { seconds: true })}</td>
                  <td className="font-mono">{r.actor}</td>
                  <td className="font-mono">{r.action}</td>
                  <td>{r.entity}</td>
                  <td className="num">{r.entityId ?? '—'}</td>
                  <td>
                    <Change row={r} />
                  </td>
                  <td>{r.signature ? <span className="tag border-slate-line">✎ {r.signature.meaning}</span> : ''}</td>
                  <td className="num text-ink-soft">{r.address ?? '—'}</td>
                  <td>
                    <button
                      type="button"
                      className="text-sm underline"
                      aria-expanded={open === r.id}
                      onClick={() => setOpen(open === r.id ? null : r.id)}
                    >
                      {open === r.id ? 'Hide' : 'Details'}
                    </button>
                  </td>
                </tr>
                {open === r.id && (
                  <tr>
                    <td colSpan={9} className="p-0">
                      <Detail row={r} timeZone={timeZone} />
                    </td>
                  </tr>
                )}
              </Fragment>
            ))}
          </tbody>
        </table>
      </div>

      <nav aria-label="Pages" className="flex items-center gap-2">
        <button
          type="button"
          className="btn-quiet"
          disabled={loading || page.page <= 1}
          onClick={() => void load(applied, page.page - 1, pageSize)}
        >
          ← Newer
        </button>
        <span className="text-sm text-ink-soft">
          Page {page.page} of {pages}
        </span>
        <button
          type="button"
          className="btn-quiet"
          disabled={loading || page.page >= pages}
          onClick={() => void load(applied, page.page + 1, pageSize)}
        >
          Older →
        </button>
      </nav>
    </div>
  );
}
