/**
 * Alarm-system health: annunciated alarms per 10 minutes over a period against the common
 * practice benchmark lines of ANSI/ISA-18.2 (about 1 per 10 min very likely acceptable, about 2
 * the most manageable, more than 10 a flood), flood periods, stale and chattering alarms, the
 * ten most frequent sources and the priority distribution beside the ~80/15/5 target. The
 * figures are the domain's `alarmKpis` computed by the server; CSV export of the same.
 */
import { useCallback, useEffect, useMemo, useState, type SubmitEvent, type ReactNode } from 'react';
import {
  BarController,
  BarElement,
  CategoryScale,
  Chart as ChartJS,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import { Bar, Chart } from 'react-chartjs-2';
import { apiFetch } from '../../lib/client/api.ts';
import { ISA_18_2_BENCHMARKS, RATE_BAND_LABELS, type AlarmKpiReport } from '../../lib/domain/alarms/kpi.ts';
import { PRIORITY_MEANINGS } from '../../lib/shared/alarms.ts';
import { formatAge, formatRange, formatSiteTime, fromLocalInput, tickLabel, toLocalInput } from '../../lib/shared/time.ts';
import { PALETTE } from '../../styles/palette.mjs';

ChartJS.register(
  BarController,
  BarElement,
  CategoryScale,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  Legend,
);

type Health = AlarmKpiReport & { per10Min: { startMs: number; count: number }[]; meanTimeToAckMs: number | null };

const PRESETS = [
  ['8h', 'Last 8 hours', 8 * 3_600_000],
  ['24h', 'Last 24 hours', 24 * 3_600_000],
  ['7d', 'Last 7 days', 7 * 86_400_000],
  ['30d', 'Last 30 days', 30 * 86_400_000],
] as const;

interface Props {
  timeZone: string;
  nowMs: number;
}

const INK = PALETTE.slateDeep;
const FAINT = PALETTE.inkFaint;
const AMBER = PALETTE.alertMed;
const RED = PALETTE.alertHigh;

export default function AlarmHealth({ timeZone, nowMs }: Props) {
  const [range, setRange] = useState({ fromMs: nowMs - 24 * 3_600_000, toMs: nowMs });
  const [preset, setPreset] = useState<string>('24h');
  const [positions, setPositions] = useState(1);
  const [fromText, setFromText] = useState(toLocalInput(nowMs - 24 * 3_600_000, timeZone));
  const [toText, setToText] = useState(toLocalInput(nowMs, timeZone));
  const [data, setData] = useState<Health | null>(null);
  const [loading, setLoading] = useState(true);
  const [error, setError] = useState<string | null>(null);
  /** The query whose figures are shown (browser tests wait on `data-loaded` matching the export link). */
  const [loadedQuery, setLoadedQuery] = useState<string | null>(null);

  const query = `from=${Math.round(range.fromMs)}&to=${Math.round(range.toMs)}&positions=${positions}`;
  const load = useCallback(async () => {
    setLoading(true);
    setError(null);
    try {
      setData(await apiFetch<Health>(`/api/v1/alarms/kpi?${query}`));
      setLoadedQuery(query);
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
    } finally {
      setLoading(false);
    }
  }, [query]);
  useEffect(() => {
    void load();
  }, [load]);

  const choosePreset = (key: string, ms: number) => {
    const to = Date.now();
    setPreset(key);
    setRange({ fromMs: to - ms, toMs: to });
    setFromText(toLocalInput(to - ms, timeZone));
    setToText(toLocalInput(to, timeZone));
  };
  const [rangeError, setRangeError] = useState<string | null>(null);
  const applyCustom = (e: SubmitEvent<HTMLFormElement>) => {
    e.preventDefault();
    const f = fromLocalInput(fromText, timeZone);
    const t = fromLocalInput(toText, timeZone);
    if (!Number.isFinite(f) || !Number.isFinite(t)) return setRangeError('Enter both times.');
    if (f >= t) return setRangeError('“From” must be before “to”.');
    if (t - f > 92 * 86_400_000) return setRangeError('At most 92 days at once.');
    setRangeError(null);
    setPreset('custom');
    setRange({ fromMs: f, toMs: t });
  };

  return (
    <div className="space-y-4" data-alarm-health data-loaded={loadedQuery ?? ''}>
      <section className="panel flex flex-wrap items-end gap-4" aria-label="Period">
        <div role="group" aria-label="Quick periods" className="flex flex-wrap gap-1">
          {PRESETS.map(([key, label, ms]) => (
            <button
              key={key}
              type="button"
              className={preset === key ? 'btn' : 'btn-quiet'}
              aria-pressed={preset === key}
              onClick={() => choosePreset(key, ms)}
            >
              {label}
            </button>
          ))}
        </div>
        <form onSubmit={applyCustom} className="flex flex-wrap items-end gap-2" aria-label="Custom period">
          <div>
            <label htmlFor="h-from">From ({timeZone})</label>
            <input id="h-from" type="datetime-local" value={fromText} onChange={(e) => setFromText(e.target.value)} />
          </div>
          <div>
            <label htmlFor="h-to">To ({timeZone})</label>
            <input id="h-to" type="datetime-local" value={toText} onChange={(e) => setToText(e.target.value)} />
          </div>
          <button type="submit" className="btn-quiet">
            Show
          </button>
        </form>
        <div className="w-40">
          <label htmlFor="h-pos">Operator positions</label>
          <input
            id="h-pos"
            type="number"
            min={1}
            max={50}
            value={positions}
            onChange={(e) => setPositions(Math.max(1, Math.min(50, Math.round(Number(e.target.value)) || 1)))}
          />
        </div>
        <a className="btn-quiet" href={`/api/v1/alarms/kpi?${query}&format=csv`} download>
          Export CSV
        </a>
        {rangeError && (
          <p className="w-full text-sm text-alert-high" role="alert">
            {rangeError}
          </p>
        )}
      </section>

      <p className="text-sm text-ink-soft" aria-live="polite">
        {formatRange(range.fromMs, range.toMs, timeZone)}
        {loading ? ' — computing…' : ''}
      </p>
      {error && (
        <p className="caution" role="alert">
          Could not compute the figures: {error}{' '}
          <button type="button" className="underline" onClick={() => void load()}>
            Try again
          </button>
        </p>
      )}
      {!data && loading && <div className="h-64 animate-pulse rounded-md bg-slate-panel" aria-label="Loading" />}
      {data && <Report data={data} timeZone={timeZone} />}
    </div>
  );
}

function Report({ data, timeZone }: { data: Health; timeZone: string }) {
  const r = data;
  const pos = r.window.operatorPositions;
  const band = r.rate.band;
  const bandTone = band === 'very-likely-acceptable' ? '' : band === 'maximum-manageable' ? 'text-alert-med' : 'text-alert-high';
  const bandShape = band === 'very-likely-acceptable' ? '✓' : band === 'maximum-manageable' ? '◆' : '▲';

  const rateChart = useMemo((): { data: ChartData<'bar' | 'line'>; options: ChartOptions<'bar' | 'line'> } => {
    const span = r.window.toMs - r.window.fromMs;
    const labels = data.per10Min.map((b) => tickLabel(b.startMs, timeZone, span));
    const flat = (v: number) => data.per10Min.map(() => v);
    return {
      data: {
        labels,
        datasets: [
          {
            type: 'bar',
            label: 'Alarms in the 10 minutes',
            data: data.per10Min.map((b) => b.count),
            backgroundColor: INK,
            order: 2,
          },
          {
            type: 'line',
            label: `About ${ISA_18_2_BENCHMARKS.acceptablePer10Min * pos} per 10 min: very likely acceptable`,
            data: flat(ISA_18_2_BENCHMARKS.acceptablePer10Min * pos),
            borderColor: FAINT,
            borderDash: [4, 3],
            pointRadius: 0,
            borderWidth: 1.5,
            order: 1,
          },
          {
            type: 'line',
            label: `About ${ISA_18_2_BENCHMARKS.maxManageablePer10Min * pos} per 10 min: most manageable`,
            data: flat(ISA_18_2_BENCHMARKS.maxManageablePer10Min * pos),
            borderColor: AMBER,
            borderDash: [8, 3],
            pointRadius: 0,
            borderWidth: 1.5,
            order: 1,
          },
          {
            type: 'line',
            label: `More than ${ISA_18_2_BENCHMARKS.floodMoreThan * pos} per 10 min: flood`,
            data: flat(ISA_18_2_BENCHMARKS.floodMoreThan * pos),
            borderColor: RED,
            pointRadius: 0,
            borderWidth: 1.5,
            order: 1,
          },
        ],
      },
      options: {
        animation: false,
        maintainAspectRatio: false,
        interaction: { mode: 'index', intersect: false },
        scales: {
          x: {
            ticks: { autoSkip: true, maxTicksLimit: 12, maxRotation: 0 },
            title: { display: true, text: `10-minute periods (${timeZone})` },
            grid: { display: false },
          },
          y: { beginAtZero: true, title: { display: true, text: 'alarms per 10 min' }, ticks: { precision: 0 } },
        },
        plugins: { legend: { position: 'bottom', labels: { boxWidth: 18 } } },
      },
    };
  }, [data, timeZone, pos, r.window.fromMs, r.window.toMs]);

  const sourcesChart = useMemo(
    () => ({
      data: {
        labels: r.topSources.map((s) => s.source),
        datasets: [{ label: 'Alarms', data: r.topSources.map((s) => s.count), backgroundColor: INK }],
      } satisfies ChartData<'bar'>,
      options: {
        indexAxis: 'y' as const,
        animation: false as const,
        maintainAspectRatio: false,
        scales: { x: { beginAtZero: true, ticks: { precision: 0 }, title: { display: true, text: 'alarms in the period' } } },
        plugins: { legend: { display: false } },
      } satisfies ChartOptions<'bar'>,
    }),
    [r.topSources],
  );

  const priorityChart = useMemo(
    () => ({
      data: {
        labels: ['High', 'Medium', 'Low'],
        datasets: [
          {
            label: 'This period (%)',
            data: [r.priorities.percent.high, r.priorities.percent.medium, r.priorities.percent.low],
            backgroundColor: INK,
          },
          {
            label: 'Common practice target (%)',
            data: [
              r.priorities.commonPracticeTargetPercent.high,
              r.priorities.commonPracticeTargetPercent.medium,
              r.priorities.commonPracticeTargetPercent.low,
            ],
            backgroundColor: '#c4c8c6',
          },
        ],
      } satisfies ChartData<'bar'>,
      options: {
        animation: false as const,
        maintainAspectRatio: false,
        scales: { y: { beginAtZero: true, max: 100, title: { display: true, text: '% of alarms' } } },
        plugins: { legend: { position: 'bottom' as const } },
      } satisfies ChartOptions<'bar'>,
    }),
    [r.priorities],
  );

  return (
    <>
      <section className="grid gap-3 sm:grid-cols-2 lg:grid-cols-5" aria-label="Summary">
        <Figure label="Alarms raised" value={String(r.totalAlarms)} note={`${pos} operator position${pos > 1 ? 's' : ''}`} />
        <Figure
          label="Average per 10 min per position"
          value={r.rate.averagePer10MinPerPosition.toFixed(2)}
          note={
            <span className={bandTone}>
              <span aria-hidden="true">{bandShape}</span> {RATE_BAND_LABELS[band]}
            </span>
          }
        />
        <Figure
          label="Busiest 10 minutes"
          value={String(r.rate.peak10MinCount)}
          note={r.rate.peak10MinStartMs !== null ? `from ${formatSiteTime(r.rate.peak10MinStartMs, timeZone)}` : 'no alarms'}
        />
        <Figure
          label="Time in flood"
          value={`${r.floods.percentTimeInFlood.toFixed(1)} %`}
          note={`${r.floods.periods.length} flood period${r.floods.periods.length === 1 ? '' : 's'}; target below ${ISA_18_2_BENCHMARKS.timeInFloodPercentBelow} %`}
        />
        <Figure
          label="Mean time to acknowledge"
          value={data.meanTimeToAckMs === null ? '—' : formatAge(data.meanTimeToAckMs)}
          note="of the acknowledged alarms"
        />
      </section>

      <section className="panel" aria-labelledby="rate-h">
        <h2 id="rate-h">Alarms per 10 minutes against the benchmark</h2>
        <p className="text-xs text-ink-soft">
          {r.rate.benchmark}; lines scaled to {pos} position{pos > 1 ? 's' : ''}.
        </p>
        {r.totalAlarms === 0 ? (
          <p className="empty mt-2">No alarms were raised in this period.</p>
        ) : (
          <div className="mt-2 h-72" role="img" aria-label={`Bar chart of alarms per 10 minutes; peak ${r.rate.peak10MinCount}`}>
            <Chart type="bar" data={rateChart.data} options={rateChart.options} />
          </div>
        )}
      </section>

      <div className="grid gap-4 lg:grid-cols-2">
        <section className="panel" aria-labelledby="src-h">
          <h2 id="src-h">Ten most frequent sources</h2>
          {r.topSources.length === 0 ? (
            <p className="empty mt-2">None.</p>
          ) : (
            <>
              <div
                className="mt-2"
                style={{ height: `${Math.max(120, r.topSources.length * 28 + 40)}px` }}
                role="img"
                aria-label="Bar chart of the most frequent sources"
              >
                <Bar data={sourcesChart.data} options={sourcesChart.options} />
              </div>
              <table className="mt-2">
                <thead>
                  <tr>
                    <th>Source</th>
                    <th className="text-right">Alarms</th>
                    <th className="text-right">Share</th>
                  </tr>
                </thead>
                <tbody>
                  {r.topSources.map((s) => (
                    <tr key={s.source}>
                      <td>{s.source}</td>
                      <td className="num text-right">{s.count}</td>
                      <td className="num text-right">{s.sharePercent.toFixed(1)} %</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </>
          )}
        </section>
        <section className="panel" aria-labelledby="pri-h">
          <h2 id="pri-h">Priority distribution</h2>
          <div className="mt-2 h-56" role="img" aria-label="Bar chart of the priority distribution against the target">
            <Bar data={priorityChart.data} options={priorityChart.options} />
          </div>
          <ul className="mt-2 space-y-0.5 text-sm">
            {(['high', 'medium', 'low'] as const).map((p) => (
              <li key={p}>
                <span className="font-bold">{p}</span>: {r.priorities.counts[p]} ({r.priorities.percent[p].toFixed(1)} %, target ≈{' '}
                {r.priorities.commonPracticeTargetPercent[p]} %) — {PRIORITY_MEANINGS[p]}
              </li>
            ))}
          </ul>
        </section>
      </div>

      <div className="grid gap-4 lg:grid-cols-3">
        <section className="panel" aria-labelledby="flood-h">
          <h2 id="flood-h">Flood periods</h2>
          <p className="text-xs text-ink-soft">More than {ISA_18_2_BENCHMARKS.floodMoreThan} alarms in 10 minutes.</p>
          {r.floods.periods.length === 0 ? (
            <p className="mt-2 text-sm">None — good.</p>
          ) : (
            <table className="mt-2">
              <thead>
                <tr>
                  <th>Period</th>
                  <th className="text-right">Alarms</th>
                </tr>
              </thead>
              <tbody>
                {r.floods.periods.map((f) => (
                  <tr key={f.startMs}>
                    <td>{formatRange(f.startMs, f.endMs, timeZone)}</td>
                    <td className="num text-right">{f.count}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
        <section className="panel" aria-labelledby="chat-h">
          <h2 id="chat-h">Chattering sources</h2>
          <p className="text-xs text-ink-soft">
            {ISA_18_2_BENCHMARKS.chatterCount} or more activations within 60 s; target: none.
          </p>
          {r.chattering.length === 0 ? (
            <p className="mt-2 text-sm">None — good.</p>
          ) : (
            <table className="mt-2">
              <thead>
                <tr>
                  <th>Source</th>
                  <th className="text-right">Most in 60 s</th>
                  <th className="text-right">All</th>
                </tr>
              </thead>
              <tbody>
                {r.chattering.map((c) => (
                  <tr key={c.source}>
                    <td>{c.source}</td>
                    <td className="num text-right">{c.maxIn60s}</td>
                    <td className="num text-right">{c.activations}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
        <section className="panel" aria-labelledby="stale-h">
          <h2 id="stale-h">Stale alarms</h2>
          <p className="text-xs text-ink-soft">Still active more than 24 h at the end of the period.</p>
          {r.stale.length === 0 ? (
            <p className="mt-2 text-sm">None — good.</p>
          ) : (
            <table className="mt-2">
              <thead>
                <tr>
                  <th>Source</th>
                  <th>Since</th>
                  <th className="text-right">Active for</th>
                </tr>
              </thead>
              <tbody>
                {r.stale.map((s) => (
                  <tr key={String(s.id)}>
                    <td>{s.source}</td>
                    <td className="text-xs">{formatSiteTime(s.activatedAtMs, timeZone)}</td>
                    <td className="num text-right">{formatAge(s.activeForMs)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
      </div>
    </>
  );
}

function Figure({ label, value, note }: { label: string; value: string; note: ReactNode }) {
  return (
    <div className="panel">
      <p className="text-sm font-bold text-ink-soft">{label}</p>
      <p className="num text-2xl">{value}</p>
      <p className="text-xs text-ink-soft">{note}</p>
    </div>
  );
}
