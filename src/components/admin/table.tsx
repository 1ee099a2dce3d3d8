/**
 * Small pieces shared by the office tables of the admin, plant set-up and audit screens:
 * sortable column headers (keyboard usable, aria-sort), a sort function, CSV download of what
 * is shown, and a status line for results of actions.
 */
import { useState, type ReactNode } from 'react';
import { toCsv } from '../../lib/shared/csv-table.ts';

export interface Sort<K extends string> {
  key: K;
  dir: 1 | -1;
}

export function useSort<K extends string>(initial: Sort<K>) {
  const [sort, setSort] = useState<Sort<K>>(initial);
  const toggle = (key: K) => setSort((s) => (s.key === key ? { key, dir: s.dir === 1 ? -1 : 1 } : { key, dir: 1 }));
  return { sort, toggle };
}

/** Sort a copy of `rows` by `get(row)`; nulls last; numbers numerically, text naturally. */
export function sortRows<T>(rows: readonly T[], get: (row: T) => string | number | boolean | null | undefined, dir: 1 | -1): T[] {
  const coll = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });
  return [...rows].sort((a, b) => {
    const x = get(a);
    const y = get(b);
    if (x == null && y == null) return 0;
    if (x == null) return 1;
    if (y == null) return -1;
    if (typeof x === 'number' && typeof y === 'number') return (x - y) * dir;
    return coll.compare(String(x), String(y)) * dir;
  });
}

export function SortTh<K extends string>({
  k,
  sort,
  toggle,
  children,
  className,
}: {
  k: K;
  sort: Sort<K>;
  toggle: (k: K) => void;
  children: ReactNode;
  className?: string;
}) {
  const active = sort.key === k;
  return (
    <th scope="col" aria-sort={active ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none'} className={className}>
      <button
        type="button"
        onClick={() => toggle(k)}
        className="inline-flex items-center gap-1 font-bold text-ink-soft hover:text-ink"
      >
        {children}
        <span aria-hidden="true" className="text-xs text-ink-faint">
          {active ? (sort.dir === 1 ? '▲' : '▼') : '↕'}
        </span>
      </button>
    </th>
  );
}

/** Download `rows` as a CSV file (what the table shows, in its order). */
export function downloadCsv(filename: string, header: readonly string[], rows: readonly (readonly unknown[])[]): void {
  const blob = new Blob([toCsv(header, rows)], { type: 'text/csv;charset=utf-8' });
  const a = document.createElement('a');
  a.href = URL.createObjectURL(blob);
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 1000);
}

export type Notice = { kind: 'ok' | 'error'; text: string } | null;

/** The result of the last action, announced to screen readers. Errors carry a marker and words, not colour alone. */
export function NoticeLine({ notice, onClose }: { notice: Notice; onClose: () => void }) {
  if (!notice) return <div aria-live="polite" />;
  return (
    <div
      aria-live="polite"
      role={notice.kind === 'error' ? 'alert' : 'status'}
      className={
        notice.kind === 'error'
          ? 'flex items-start gap-2 rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
          : 'flex items-start gap-2 rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
      }
    >
      <strong>{notice.kind === 'error' ? '✕ Not done.' : '✓ Done.'}</strong>
      <span className="flex-1">{notice.text}</span>
      <button type="button" className="text-xs underline" onClick={onClose}>
        Dismiss
      </button>
    </div>
  );
}

export function problemText(e: unknown): string {
  if (e && typeof e === 'object' && 'title' in e) {
    const p = e as { title: string; detail?: string; errors?: { path: string; message: string }[] };
    if (p.errors?.length)
      return p.errors.map((f) => (f.path && f.path !== '(body)' ? `${f.path}: ${f.message}` : f.message)).join(' ');
    return p.detail ? `${p.title}: ${p.detail}` : p.title;
  }
  return e instanceof Error ? e.message : 'Something went wrong.';
}
