/** Dip runs: sortable, filterable, CSV of what is shown; withdrawal speed and bath viscosity against the window. */
import { useMemo, useState } from 'react';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import type { DipRunItem } from '../../lib/shared/trace-views.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';
import WindowBar from '../windows/WindowBar.tsx';

type Key = 'at' | 'line' | 'rack' | 'jobs' | 'speed' | 'visc';

export default function DipTable({ initial, timeZone }: { initial: DipRunItem[]; timeZone: string }) {
  const [text, setText] = useState('');
  const { sort, toggle } = useSort<Key>({ key: 'at', dir: -1 });
  const shown = useMemo(() => {
    const q = text.trim().toLowerCase();
    const f = q
      ? initial.filter((d) => [d.lineName, d.rackCode ?? '', d.lotCode ?? '', ...d.jobs].some((s) => s.toLowerCase().includes(q)))
      : initial;
    return sortRows(
      f,
      (d) =>
        ({
          at: d.dippedAt,
          line: d.lineCode,
          rack: d.rackCode,
          jobs: d.jobs.length,
          speed: d.withdrawalSpeedMmS,
          visc: d.lastCheckMm2S,
        })[sort.key],
      sort.dir,
    );
  }, [initial, text, sort]);
  const t = (s: string | null) => formatSiteTime(s, timeZone);
  const csv = () =>
    downloadCsv(
      'dip-runs.csv',
      [
        'dip run',
        `dipped (${timeZone})`,
        'line',
        'rack',
        'jobs',
        'withdrawal mm/s',
        'bath charge',
        'lot',
        `last check (${timeZone})`,
        'viscosity mm²/s',
        'window',
      ],
      shown.map((d) => [
        d.id,
        t(d.dippedAt),
        d.lineCode,
        d.rackCode ?? '',
        d.jobs.join(' '),
        d.withdrawalSpeedMmS?.toFixed(3) ?? '',
        d.bathChargeId ?? '',
        d.lotCode ?? '',
        d.lastCheckAt ? t(d.lastCheckAt) : '',
        d.lastCheckMm2S?.toFixed(2) ?? '',
        d.windowName ? `${d.windowName} v${d.windowVersion}` : '',
      ]),
    );
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="dip-q">Filter the rows shown</label>
          <input
            id="dip-q"
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            className="w-64"
            placeholder="job, rack, lot…"
          />
        </div>
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV of these {shown.length} rows
        </button>
      </div>
      {shown.length === 0 ? (
        <div className="empty" role="status">
          No dip runs match.
        </div>
      ) : (
        <div className="max-h-[40rem] overflow-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead className="sticky top-0">
              <tr>
                <SortTh k="at" sort={sort} toggle={toggle}>
                  Dipped ({timeZone})
                </SortTh>
                <SortTh k="line" sort={sort} toggle={toggle}>
                  Line
                </SortTh>
                <SortTh k="rack" sort={sort} toggle={toggle}>
                  Rack
                </SortTh>
                <SortTh k="jobs" sort={sort} toggle={toggle}>
                  Jobs
                </SortTh>
                <SortTh k="speed" sort={sort} toggle={toggle}>
                  Withdrawal speed
                </SortTh>
                <SortTh k="visc" sort={sort} toggle={toggle}>
                  Last bath check
                </SortTh>
                <th scope="col">Bath charge</th>
              </tr>
            </thead>
            <tbody>
              {shown.map((d) => (
                <tr key={d.id}>
                  <td className="num">{t(d.dippedAt)}</td>
                  <td>{d.lineName}</td>
                  <td className="num">{d.rackCode ?? '—'}</td>
                  <td className="num text-sm">
                    {d.jobs.map((j, i) => (
                      <span key={j}>
                        {i > 0 && ', '}
                        <a href={`/quality/trace/${encodeURIComponent(j)}`}>{j}</a>
                      </span>
                    ))}
                  </td>
                  <td>
                    <WindowBar
                      label="Withdrawal speed"
                      value={d.withdrawalSpeedMmS}
                      min={d.speedWindow?.min}
                      max={d.speedWindow?.max}
                      unit="mm/s"
                      digits={3}
                    />
                  </td>
                  <td>
                    {d.lastCheckAt ? (
                      <>
                        <WindowBar
                          label="Viscosity"
                          value={d.lastCheckMm2S}
                          min={d.viscosityWindow?.min}
                          max={d.viscosityWindow?.max}
                          unit="mm²/s"
                          digits={2}
                        />
                        <div className="text-xs text-ink-soft">{t(d.lastCheckAt)}</div>
                      </>
                    ) : (
                      <span className="text-ink-faint">no check before the dip</span>
                    )}
                  </td>
                  <td className="text-sm">{d.bathChargeId ? `${d.bathChargeId} · lot ${d.lotCode}` : '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
