/**
 * A dense office table for the bath log, lots, charges and window versions: sortable columns,
 * a text filter over every column, and CSV export of exactly what is shown. Rows arrive already
 * formatted (times in the site's zone with the zone printed, units in the headers).
 */
import { useId, useMemo, useState } from 'react';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';

export interface Column {
  key: string;
  label: string;
  numeric?: boolean;
}

export type Cell = string | number | null;

interface Props {
  caption: string;
  columns: Column[];
  rows: Record<string, Cell>[];
  /** CSV file name (without .csv). */
  filename: string;
  empty?: string;
  /** Optional link per row: the key of a cell that holds a URL for the first column. */
  hrefKey?: string;
  /** Initial sort (default: the first column, descending — newest first for time columns). */
  initialSort?: { key: string; dir: 1 | -1 };
  /** Rows shown before "Show more" (the CSV export always holds every filtered row). */
  pageSize?: number;
}

export default function RecordTable({
  caption,
  columns,
  rows,
  filename,
  empty = 'Nothing recorded yet.',
  hrefKey,
  initialSort,
  pageSize = 50,
}: Props) {
  const id = useId();
  const [filter, setFilter] = useState('');
  const [limit, setLimit] = useState(pageSize);
  const { sort, toggle } = useSort<string>(initialSort ?? { key: columns[0]?.key ?? '', dir: -1 });
  const shown = useMemo(() => {
    const f = filter.trim().toLowerCase();
    const kept = f
      ? rows.filter((r) =>
          columns.some((c) =>
            String(r[c.key] ?? '')
              .toLowerCase()
              .includes(f),
          ),
        )
      : rows;
    return sortRows(kept, (r) => r[sort.key] ?? null, sort.dir);
  }, [rows, columns, filter, sort]);
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        <div className="w-64">
          <label htmlFor={`${id}-filter`}>Filter</label>
          <input
            id={`${id}-filter`}
            type="search"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            placeholder="any column contains…"
          />
        </div>
        <button
          type="button"
          className="btn-quiet"
          onClick={() =>
            downloadCsv(
              `${filename}.csv`,
              columns.map((c) => c.label),
              shown.map((r) => columns.map((c) => r[c.key] ?? '')),
            )
          }
          disabled={shown.length === 0}
        >
          Export CSV
        </button>
        <span className="text-sm text-ink-soft" aria-live="polite">
          {shown.length} of {rows.length} rows
        </span>
      </div>
      {rows.length === 0 ? (
        <p className="empty">{empty}</p>
      ) : (
        <div className="overflow-x-auto">
          <table>
            <caption className="sr-only">{caption}</caption>
            <thead>
              <tr>
                {columns.map((c) => (
                  <SortTh key={c.key} k={c.key} sort={sort} toggle={toggle} className={c.numeric ? 'text-right' : ''}>
                    {c.label}
                  </SortTh>
                ))}
              </tr>
            </thead>
            <tbody>
              {shown.slice(0, limit).map((r, i) => (
                <tr key={i}>
                  {columns.map((c, j) => (
                    <td key={c.key} className={c.numeric ? 'num text-right' : ''}>
                      {j === 0 && hrefKey && r[hrefKey] ? <a href={String(r[hrefKey])}>{r[c.key] ?? '—'}</a> : (r[c.key] ?? '—')}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
          {shown.length > limit && (
            <p className="mt-2 flex items-center gap-3 text-sm text-ink-soft">
              Showing {limit} of {shown.length}.
              <button type="button" className="btn-quiet" onClick={() => setLimit((l) => l + pageSize * 4)}>
                Show more
              </button>
            </p>
          )}
        </div>
      )}
    </div>
  );
}
