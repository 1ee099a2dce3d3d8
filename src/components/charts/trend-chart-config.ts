/**
 * The channel trend's chart.js configuration, pure: the datasets (mean line, min–max band, raw
 * points, event markers) and the options (time axis ticks on the site's wall clock, one y axis
 * per unit, the process window as annotations, tooltips) from what the island has loaded.
 */
import type { ChartData, ChartOptions, Plugin, Scale, TooltipItem } from 'chart.js';
import { thinLine } from '../../lib/domain/series/thin-line.ts';
import { formatClock, formatSiteTime, tickLabel, timeTicks, zonesOver } from '../../lib/shared/time.ts';
import {
  EVENT_STYLE,
  TREND_EVENT_KINDS,
  windowChanges,
  type AnnotationsResponse,
  type ChartPoint,
  type Marker,
  type PlottedRow,
  type ShapedSeries,
  type unitAxes,
  type windowBands,
} from '../../lib/shared/trend.ts';
import { PALETTE, PRIORITY_COLOUR } from '../../styles/palette.mjs';

export interface TrendChannelOption {
  id: number;
  name: string;
  kind: string;
  unit: string;
  assetName: string;
}

export interface SeriesState {
  status: 'ok' | 'error';
  shaped?: ShapedSeries;
  error?: string;
}

/** The window stretches and events of one channel (or why they could not be loaded). */
export interface Note {
  a: AnnotationsResponse | null;
  error?: string;
}

/** One channel on the chart with what has been loaded for it. */
export interface LoadedSeries {
  id: number;
  ch: TrendChannelOption;
  st: SeriesState | undefined;
}

/** Series styles: muted line colours with distinct dash patterns (colour is not the only difference). */
export const STYLES = [
  { line: PALETTE.slateDeep, fill: 'rgba(45,58,66,0.16)', dash: [] as number[], name: 'solid' },
  { line: '#1d5f8a', fill: 'rgba(29,95,138,0.16)', dash: [7, 4], name: 'dashed' },
  { line: '#5b4f8a', fill: 'rgba(91,79,138,0.14)', dash: [2, 3], name: 'dotted' },
  { line: '#6b5a2e', fill: 'rgba(107,90,46,0.14)', dash: [10, 3, 2, 3], name: 'dash-dot' },
  { line: '#3f5f3f', fill: 'rgba(63,95,63,0.14)', dash: [14, 4], name: 'long dash' },
  { line: '#7a4a5a', fill: 'rgba(122,74,90,0.14)', dash: [4, 2], name: 'short dash' },
];
export const MAX_CHANNELS = 6;
const EVENTS_AXIS_MAX = 24;
export const SOURCE_WORDS = { raw: 'raw readings', minute: 'minute rollup', hour: 'hourly rollup' } as const;

export const widthWords = (ms: number) =>
  ms % 86_400_000 === 0
    ? `${ms / 86_400_000} d`
    : ms % 3_600_000 === 0
      ? `${ms / 3_600_000} h`
      : ms % 60_000 === 0
        ? `${ms / 60_000} min`
        : `${ms / 1000} s`;

/** Paints the canvas white behind everything, so the PNG export is not transparent. */
export const whiteBackground: Plugin<'line'> = {
  id: 'whiteBackground',
  beforeDraw(chart) {
    const { ctx } = chart;
    ctx.save();
    ctx.globalCompositeOperation = 'destination-over';
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, chart.width, chart.height);
    ctx.restore();
  },
};

/** Marks the wrapper `data-drawn="true"` once a chart with loaded data has rendered (browser tests and the benchmark wait on it). */
export const drawnFlag: Plugin<'line', { ready?: boolean; points?: number }> = {
  id: 'drawnFlag',
  afterRender(chart, _args, opts) {
    const el = chart.canvas.closest('[data-trend]');
    if (!el) return;
    el.setAttribute('data-drawn', opts.ready ? 'true' : 'false');
    el.setAttribute('data-points', String(opts.points ?? 0));
  },
};

/** The datasets of the chart: per channel a line (and a min–max band when bucketed), then the event markers. */
export function trendDatasets({
  loaded,
  axisOf,
  showEvents,
  markers,
  widthPx,
}: {
  loaded: readonly LoadedSeries[];
  axisOf: (unit: string) => string;
  showEvents: boolean;
  markers: readonly Marker[];
  widthPx: number;
}): { data: ChartData<'line', ChartPoint[]>; totalPoints: number } {
  const datasets: any[] = [];
  let totalPoints = 0;
  loaded.forEach(({ ch, st }, i) => {
    const s = st?.shaped;
    if (!s) return;
    const style = STYLES[i % STYLES.length]!;
    const yAxisID = axisOf(ch.unit);
    const rows = new Map<number, PlottedRow>(s.rows.map((r) => [r.x, r]));
    const common = { yAxisID, spanGaps: false, parsing: false, normalized: true, _ch: ch, _rows: rows, _mode: s.mode };
    if (s.mode === 'bucketed') {
      datasets.push({
        ...common,
        label: `${ch.name} max`,
        data: s.max,
        borderWidth: 0,
        pointRadius: 0,
        fill: '+1',
        backgroundColor: style.fill,
        _role: 'band',
      });
      datasets.push({
        ...common,
        label: `${ch.name} min`,
        data: s.min,
        borderWidth: 0,
        pointRadius: 0,
        fill: false,
        _role: 'band',
      });
      datasets.push({
        ...common,
        label: `${ch.name} (${ch.unit}) — mean, min–max band per ${widthWords(s.bucketMs ?? 0)}`,
        data: s.line,
        borderColor: style.line,
        backgroundColor: style.line,
        borderDash: style.dash,
        borderWidth: 1.6,
        pointRadius: 0,
        pointStyle: 'line',
        _role: 'line',
      });
      totalPoints += s.rows.length;
    } else {
      const line = thinLine(s.line, Math.max(200, widthPx * 1.5));
      const dots = s.rows.length <= 240;
      datasets.push({
        ...common,
        label: `${ch.name} (${ch.unit}) — readings`,
        data: line,
        borderColor: style.line,
        backgroundColor: style.line,
        borderDash: style.dash,
        borderWidth: 1.6,
        pointRadius: dots ? 2.2 : 0,
        pointHoverRadius: 4,
        pointStyle: dots ? 'circle' : 'line',
        stepped: ch.kind === 'door' ? 'before' : false,
        _role: 'line',
      });
      totalPoints += s.rows.length;
    }
  });
  if (showEvents) {
    for (const kind of TREND_EVENT_KINDS) {
      const ms = markers.filter((m) => m.kind === kind);
      if (ms.length === 0) continue;
      const st = EVENT_STYLE[kind];
      datasets.push({
        label: st.many.charAt(0).toUpperCase() + st.many.slice(1),
        data: ms.map((m) => ({ x: m.x, y: m.lane + 0.7, _m: m })),
        yAxisID: 'events',
        showLine: false,
        parsing: false,
        pointStyle: st.shape,
        pointRadius: (c: any) => (c.raw?._m?.count > 1 ? 8 : 6.5),
        pointHoverRadius: 9,
        pointBackgroundColor: (c: any) =>
          kind === 'alarm' ? PRIORITY_COLOUR[(c.raw?._m as Marker | undefined)?.priority ?? 'low'] : PALETTE.inkSoft,
        pointBorderColor: PALETTE.ink,
        borderColor: kind === 'alarm' ? PRIORITY_COLOUR.high : PALETTE.inkSoft,
        backgroundColor: kind === 'alarm' ? PRIORITY_COLOUR.high : PALETTE.inkSoft,
        pointBorderWidth: 1,
        _role: 'marker',
      });
    }
  }
  return { data: { datasets } as ChartData<'line', ChartPoint[]>, totalPoints };
}

/** The chart's options: scales, window annotations, the linked instant, legend, tooltips, the drawn flag. */
export function trendOptions({
  axes,
  axisOf,
  loaded,
  span,
  bandsByChannel,
  showWindow,
  showEvents,
  markers,
  fromMs,
  toMs,
  at,
  tz,
  loading,
  anyData,
  totalPoints,
  widthPx,
}: {
  axes: ReturnType<typeof unitAxes>;
  axisOf: (unit: string) => string;
  loaded: readonly LoadedSeries[];
  span: number;
  bandsByChannel: ReadonlyMap<number, ReturnType<typeof windowBands>>;
  showWindow: boolean;
  showEvents: boolean;
  markers: readonly Marker[];
  fromMs: number;
  toMs: number;
  at: number | null;
  tz: string;
  loading: { done: number; total: number } | null;
  anyData: boolean;
  totalPoints: number;
  widthPx: number;
}): ChartOptions<'line'> {
  const annotations: Record<string, any> = {};
  if (showWindow) {
    loaded.forEach(({ id, ch }, i) => {
      const bands = bandsByChannel.get(id) ?? [];
      const style = STYLES[i % STYLES.length]!;
      const yScaleID = axisOf(ch.unit);
      bands.forEach((b, k) => {
        const base = {
          xScaleID: 'x',
          yScaleID,
          xMin: Math.max(b.fromMs, fromMs),
          xMax: Math.min(b.toMs, toMs),
          drawTime: 'beforeDatasetsDraw',
        };
        annotations[`w${id}-${k}`] = {
          ...base,
          type: 'box',
          yMin: b.min,
          yMax: b.max,
          // Only the first channel's window is shaded; the others are drawn as limit lines in their series' style.
          backgroundColor: i === 0 ? 'rgba(47,111,115,0.07)' : 'rgba(0,0,0,0)',
          borderWidth: 0,
          label: {
            display: k === 0 && i < 3,
            content: `${ch.name}: window ${b.label} ${b.min}–${b.max} ${ch.unit}${b.lowApplies === 'soak' ? ' (low limit in soak only)' : b.lowApplies === 'load' ? ' (low limit while loaded)' : ''}`,
            position: { x: 'start', y: 'start' },
            color: i === 0 ? PALETTE.lacquerDark : style.line,
            font: { size: 11 },
            padding: 3,
          },
        };
        for (const [key, y, dash] of [
          ['lo', b.min, [6, 4]],
          ['hi', b.max, [6, 4]],
          ...(b.target !== null ? [['tg', b.target, [1, 3]] as const] : []),
        ] as const) {
          annotations[`w${id}-${k}-${key}`] = {
            ...base,
            type: 'line',
            yMin: y,
            yMax: y,
            borderColor: i === 0 ? PALETTE.lacquer : style.line,
            borderWidth: i === 0 ? 1 : 1.4,
            borderDash: dash,
          };
        }
      });
      windowChanges(bands).forEach((c, k) => {
        if (c.tMs <= fromMs || c.tMs >= toMs) return;
        annotations[`wc${id}-${k}`] = {
          type: 'line',
          xScaleID: 'x',
          xMin: c.tMs,
          xMax: c.tMs,
          borderColor: PALETTE.lacquer,
          borderWidth: 1.5,
          borderDash: [3, 3],
          label: {
            display: true,
            content: c.label,
            position: 'end',
            backgroundColor: 'rgba(31,78,81,0.85)',
            font: { size: 10 },
          },
        };
      });
    });
  }
  if (at !== null && at >= fromMs && at <= toMs) {
    annotations['at'] = {
      type: 'line',
      xScaleID: 'x',
      xMin: at,
      xMax: at,
      borderColor: PALETTE.ink,
      borderWidth: 2,
      label: {
        display: true,
        content: `Linked time ${formatClock(at, tz, { seconds: true })}`,
        position: 'start',
        backgroundColor: PALETTE.ink,
        font: { size: 11 },
      },
    };
  }
  // Extents of the shaded windows per axis, so a window is visible even when the data sits inside it.
  const bandExtent = new Map<string, [number, number]>();
  if (showWindow) {
    loaded.forEach(({ id, ch }) => {
      for (const b of bandsByChannel.get(id) ?? []) {
        const a = axisOf(ch.unit);
        const cur = bandExtent.get(a);
        bandExtent.set(a, cur ? [Math.min(cur[0], b.min), Math.max(cur[1], b.max)] : [b.min, b.max]);
      }
    });
  }
  const hasMarkers = showEvents && markers.length > 0;
  const scales: Record<string, any> = {
    x: {
      type: 'linear',
      min: fromMs,
      max: toMs,
      ticks: {
        callback: (v: string | number) => tickLabel(Number(v), tz, span),
        maxRotation: 0,
        autoSkipPadding: 18,
        color: PALETTE.inkSoft,
      },
      // Round ticks on the site's wall clock (chart.js would align them to the browser's zone).
      afterBuildTicks: (scale: Scale) => {
        scale.ticks = timeTicks(fromMs, toMs, tz, Math.max(3, Math.floor((scale.width || widthPx) / 110))).map((value) => ({
          value,
        }));
      },
      title: { display: true, text: `Time (${tz}, ${zonesOver(fromMs, toMs, tz)})`, color: PALETTE.inkSoft },
      grid: { color: '#ebebe6' },
    },
    events: { type: 'linear', axis: 'y', display: false, min: 0, max: EVENTS_AXIS_MAX },
  };
  axes.forEach((a, i) => {
    scales[a.id] = {
      type: 'linear',
      position: a.position,
      title: { display: true, text: a.unit, color: PALETTE.ink, font: { weight: 'bold' } },
      ticks: { color: PALETTE.inkSoft },
      grid: { drawOnChartArea: i === 0, color: '#ebebe6' },
      afterDataLimits: (scale: Scale) => {
        const ext = bandExtent.get(a.id);
        let lo = Number.isFinite(scale.min) ? scale.min : (ext?.[0] ?? 0);
        let hi = Number.isFinite(scale.max) ? scale.max : (ext?.[1] ?? 1);
        if (ext) {
          lo = Math.min(lo, ext[0]);
          hi = Math.max(hi, ext[1]);
        }
        const r = hi - lo || Math.abs(hi) * 0.1 || 1;
        scale.min = lo - r * (hasMarkers ? 0.26 : 0.05);
        scale.max = hi + r * 0.06;
      },
    };
  });
  return {
    animation: false,
    responsive: true,
    maintainAspectRatio: false,
    interaction: { mode: 'nearest', axis: 'xy', intersect: false },
    scales,
    plugins: {
      legend: {
        position: 'bottom',
        labels: {
          usePointStyle: true,
          filter: (item: { datasetIndex?: number }, d: ChartData) =>
            (d.datasets[item.datasetIndex ?? 0] as any)?._role !== 'band',
          color: PALETTE.ink,
          boxHeight: 8,
        },
      },
      tooltip: {
        filter: (item: TooltipItem<'line'>) => (item.dataset as any)._role !== 'band',
        callbacks: {
          title: (items: TooltipItem<'line'>[]) => {
            const x = (items[0]?.raw as ChartPoint | undefined)?.x;
            return x === undefined ? '' : formatSiteTime(x, tz, { seconds: span <= 2 * 86_400_000 });
          },
          label: (item: TooltipItem<'line'>) => tooltipLines(item, tz),
        },
      },
      annotation: { annotations },
      drawnFlag: { ready: !loading && anyData, points: totalPoints },
    } as any,
  };
}

function tooltipLines(item: TooltipItem<'line'>, tz: string): string | string[] {
  const ds = item.dataset as any;
  const raw = item.raw as ChartPoint & { _m?: Marker };
  if (ds._role === 'marker' && raw._m) {
    const m = raw._m;
    const lines = m.events
      .slice(0, 6)
      .map((e) => `${formatClock(e.tMs, tz, { seconds: true })} ${e.label}${e.detail ? ` (${e.detail})` : ''}`);
    if (m.count > 6) lines.push(`… and ${m.count - 6} more — zoom in to see them`);
    return m.count > 1 ? [m.label, ...lines] : lines;
  }
  const ch = ds._ch as TrendChannelOption;
  const row = (ds._rows as Map<number, PlottedRow>).get(raw.x);
  if (!row) return `${ch.name}: ${raw.y} ${ch.unit}`;
  if (ds._mode === 'raw')
    return `${ch.name}: ${row.value} ${ch.unit}${row.quality ? ` (quality ${row.quality === 1 ? 'uncertain' : 'bad'})` : ''}`;
  const f = (v: number | undefined) => (v === undefined ? '—' : Number(v.toPrecision(6)));
  return `${ch.name}: mean ${f(row.mean)} ${ch.unit} (min ${f(row.min)}, max ${f(row.max)}; ${row.n} readings from ${formatClock(row.bucketStartMs ?? raw.x, tz)})`;
}
