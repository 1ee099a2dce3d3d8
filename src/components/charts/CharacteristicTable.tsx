/**
 * The control charts list on the Charts page: every characteristic with its limits version,
 * latest point and recent signals; sortable, filterable, exportable to CSV.
 */
import { useMemo, useState } from 'react';
import { violationLabel } from '../../lib/shared/characteristics.ts';
import { formatSiteTime } from '../../lib/shared/time.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';

export interface CharacteristicRow {
  id: number;
  name: string;
  assetName: string;
  chartLabel: string;
  ruleText: string;
  unit: string;
  active: boolean;
  limitsVersion: number | null;
  limitsEffectiveFrom: string | null;
  draftCount: number;
  points: number;
  lastPoint: { tMs: number; value: number; violations: string[] } | null;
  recentViolations: number;
}

type Key = 'name' | 'asset' | 'limits' | 'points' | 'last' | 'signals';

const fmt = (x: number) => Number(x.toPrecision(5)).toString();

export function CharacteristicTable({ rows, timeZone }: { rows: CharacteristicRow[]; timeZone: string }) {
  const [filter, setFilter] = useState('');
  const { sort, toggle } = useSort<Key>({ key: 'asset', dir: 1 });
  const shown = useMemo(() => {
    const f = filter.trim().toLowerCase();
    const list = f
      ? rows.filter((r) => `${r.name} ${r.assetName} ${r.chartLabel} ${r.ruleText}`.toLowerCase().includes(f))
      : rows;
    const get = (r: CharacteristicRow) =>
      sort.key === 'name'
        ? r.name
        : sort.key === 'asset'
          ? `${r.assetName} ${r.name}`
          : sort.key === 'limits'
            ? r.limitsVersion
            : sort.key === 'points'
              ? r.points
              : sort.key === 'last'
                ? (r.lastPoint?.tMs ?? null)
                : r.recentViolations;
    return sortRows(list, get, sort.dir);
  }, [rows, filter, sort]);

  const csv = () =>
    downloadCsv(
      'control-charts.csv',
      [
        'name',
        'asset',
        'chart',
        'subgroups',
        'unit',
        'limits_version',
        'limits_in_force_from',
        'points',
        'last_point_time',
        'last_value',
        'last_signals',
        'signals_in_last_50',
      ],
      shown.map((r) => [
        r.name,
        r.assetName,
        r.chartLabel,
        r.ruleText,
        r.unit,
        r.limitsVersion,
        r.limitsEffectiveFrom,
        r.points,
        r.lastPoint ? new Date(r.lastPoint.tMs).toISOString() : '',
        r.lastPoint?.value ?? '',
        r.lastPoint?.violations.join(' ') ?? '',
        r.recentViolations,
      ]),
    );

  return (
    <div>
      <div className="mb-2 flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="char-filter">Filter</label>
          <input
            id="char-filter"
            type="search"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            placeholder="name, line, oven…"
            className="w-64"
          />
        </div>
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV
        </button>
        <span className="text-sm text-ink-soft" aria-live="polite">
          {shown.length} of {rows.length}
        </span>
      </div>
      <table>
        <thead>
          <tr>
            <SortTh k="name" sort={sort} toggle={toggle}>
              Characteristic
            </SortTh>
            <SortTh k="asset" sort={sort} toggle={toggle}>
              Line / oven
            </SortTh>
            <th scope="col">Chart and subgroups</th>
            <SortTh k="limits" sort={sort} toggle={toggle}>
              Limits
            </SortTh>
            <SortTh k="points" sort={sort} toggle={toggle} className="text-right">
              Points
            </SortTh>
            <SortTh k="last" sort={sort} toggle={toggle}>
              Latest point
            </SortTh>
            <SortTh k="signals" sort={sort} toggle={toggle}>
              Signals (last 50)
            </SortTh>
            <th scope="col">
              <span className="sr-only">Links</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {shown.map((r) => (
            <tr key={r.id}>
              <td>
                <a href={`/charts/control/${r.id}`} className="font-bold">
                  {r.name}
                </a>
                {!r.active && <span className="tag ml-1 border-slate-line">inactive</span>}
              </td>
              <td>{r.assetName}</td>
              <td className="text-sm">
                {r.chartLabel}
                <br />
                <span className="text-ink-soft">{r.ruleText}</span>
              </td>
              <td className="text-sm">
                {r.limitsVersion !== null ? (
                  <>
                    v{r.limitsVersion}
                    {r.limitsEffectiveFrom && (
                      <span className="text-ink-soft"> since {formatSiteTime(r.limitsEffectiveFrom, timeZone)}</span>
                    )}
                  </>
                ) : (
                  <span>none approved</span>
                )}
                {r.draftCount > 0 && <span className="text-ink-soft"> · {r.draftCount} draft</span>}
              </td>
              <td className="num text-right">{r.points}</td>
              <td className="text-sm">
                {r.lastPoint ? (
                  <>
                    <span className="num">
                      {fmt(r.lastPoint.value)} {r.unit}
                    </span>{' '}
                    <span className="text-ink-soft">{formatSiteTime(r.lastPoint.tMs, timeZone)}</span>
                    {r.lastPoint.violations.length > 0 && (
                      <span
                        className="tag ml-1 border-alert-high text-alert-high"
                        title={r.lastPoint.violations.map(violationLabel).join('; ')}
                      >
                        ▲ {r.lastPoint.violations.join(', ')}
                      </span>
                    )}
                  </>
                ) : (
                  <span className="text-ink-soft">no points yet</span>
                )}
              </td>
              <td className="text-sm">
                {r.recentViolations > 0 ? <span>▲ {r.recentViolations}</span> : <span className="text-ink-soft">none</span>}
              </td>
              <td className="text-sm">
                <a href={`/charts/control/${r.id}/capability`}>capability</a>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
