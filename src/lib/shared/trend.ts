/**
 * Data shaping for the channel trend and the Floor: turning the readings endpoint's answer into
 * chart series (with honest gaps), the process window in force into shaded steps, alarms and
 * plant events into markers on the time axis, the plotted data into CSV, and the view range
 * into pan/zoom steps. Pure: shared by the islands, the server and the tests.
 *
 * For display only — bucketed or thinned data never feeds SPC statistics.
 */
import { toCsv } from './csv-table.ts';
import type { ReadingsResponse } from './telemetry.ts';
import { isoInZone, zoneAbbreviation } from './time.ts';
import type { ProcessWindowLimits } from './windows.ts';

const MINUTE_MS = 60_000;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

// ---------------------------------------------------------------------------------------------
// Process window per channel kind

/** The band one channel is held to, in the channel's unit. */
export interface WindowRange {
  min: number;
  max: number;
  target?: number;
  /**
   * When the low limit applies: `'soak'` only while an oven load soaks (an empty, idle or
   * ramping oven is cold by design); `'load'` while a load is in the oven (an idle controller
   * sits at a low setpoint); `'always'` otherwise. The high limit always applies.
   */
  lowApplies: 'always' | 'load' | 'soak';
  /** What the band is, in words, e.g. "Bath viscosity window". */
  label: string;
}

/**
 * Which window field holds each channel kind. Oven air temperature is held
 * between the recipe's minimum cure temperature (during soak) and the substrate's maximum
 * part temperature; the cure setpoint's low limit counts while a load is in the oven. Kinds without a field (door, irradiance, spin speed, room temperature)
 * have no window.
 */
export function windowRangeFor(kind: string, limits: ProcessWindowLimits | null | undefined): WindowRange | null {
  if (!limits) return null;
  const pick = (
    r: { min: number; max: number; target?: number } | undefined,
    label: string,
    lowApplies: WindowRange['lowApplies'] = 'always',
  ): WindowRange | null =>
    r ? { min: r.min, max: r.max, ...(r.target !== undefined ? { target: r.target } : {}), lowApplies, label } : null;
  switch (kind) {
    case 'withdrawal-speed':
      return pick(limits.withdrawalSpeedMmS, 'Withdrawal speed window');
    case 'viscosity':
      return pick(limits.viscosityMm2S, 'Bath viscosity window');
    case 'bath-temperature':
      return pick(limits.bathTempC, 'Bath temperature window');
    case 'room-humidity':
      return pick(limits.roomRhPct, 'Room humidity window');
    case 'setpoint':
      return pick(limits.cureSetpointC, 'Cure setpoint window', 'load');
    case 'air-temperature':
      return Number.isFinite(limits.minCureTempC) &&
        Number.isFinite(limits.maxPartTempC) &&
        limits.minCureTempC < limits.maxPartTempC
        ? {
            min: limits.minCureTempC,
            max: limits.maxPartTempC,
            lowApplies: 'soak',
            label: 'Cure temperature (minimum in soak) to maximum part temperature',
          }
        : null;
    default:
      return null;
  }
}

/** Where a value stands: inside its window, above, below, or there is no window to judge by. */
export type ValueState = 'normal' | 'high' | 'low' | 'no-window';

/** A value placed on a horizontal band (fractions 0…1 of the bar's width). */
export interface BandPlacement {
  state: ValueState;
  /** Position of the value marker; clamped to 0…1. */
  at: number;
  /** The value lies beyond the bar's scale and the marker is pinned to that end. */
  offScale: 'above' | 'below' | null;
  /** The window's stretch of the bar (null without a window). */
  windowFrom: number | null;
  windowTo: number | null;
  targetAt: number | null;
  scaleMin: number;
  scaleMax: number;
}

/**
 * Place a value on its band (ISA-101 style: the window in the middle half of the bar, half a
 * window width of margin either side). A value exactly on a limit is inside (not beyond it).
 * Without a window the bar spans the channel's valid range and the state is `no-window`.
 * `inLoad` / `inSoak` say whether a load is in the oven / soaking now (see `lowApplies`).
 */
export function placeOnBand(
  value: number,
  range: WindowRange | null,
  channel: { min: number; max: number },
  opts: { inLoad?: boolean; inSoak?: boolean } = {},
): BandPlacement {
  let scaleMin: number;
  let scaleMax: number;
  let state: ValueState;
  if (range) {
    const pad = (range.max - range.min) / 2;
    scaleMin = range.min - pad;
    scaleMax = range.max + pad;
    const lowCounts =
      range.lowApplies === 'always' || (range.lowApplies === 'soak' ? !!opts.inSoak : !!(opts.inLoad || opts.inSoak));
    state = value > range.max ? 'high' : lowCounts && value < range.min ? 'low' : 'normal';
  } else {
    scaleMin = channel.min;
    scaleMax = channel.max;
    state = 'no-window';
  }
  const span = scaleMax - scaleMin || 1;
  const frac = (v: number) => Math.min(1, Math.max(0, (v - scaleMin) / span));
  return {
    state,
    at: frac(value),
    offScale: value > scaleMax ? 'above' : value < scaleMin ? 'below' : null,
    windowFrom: range ? frac(range.min) : null,
    windowTo: range ? frac(range.max) : null,
    targetAt: range?.target !== undefined ? frac(range.target) : null,
    scaleMin,
    scaleMax,
  };
}

// ---------------------------------------------------------------------------------------------
// Readings → chart series

/** One plotted point; `y: null` breaks the line (a gap in the data). */
export interface ChartPoint {
  x: number;
  y: number | null;
}

/** One row of what was plotted (the CSV export writes exactly these). */
export interface PlottedRow {
  /** Plotted time, epoch ms (a reading's time, or a bucket's middle). */
  x: number;
  value?: number;
  quality?: number;
  min?: number;
  mean?: number;
  max?: number;
  n?: number;
  bucketStartMs?: number;
  bucketEndMs?: number;
}

/** A channel's answer shaped for the chart. */
export interface ShapedSeries {
  mode: 'raw' | 'bucketed';
  bucketMs: number | null;
  source: 'raw' | 'minute' | 'hour';
  /** Raw values, or the bucket means. */
  line: ChartPoint[];
  /** Bucket minima and maxima (empty in raw mode). */
  min: ChartPoint[];
  max: ChartPoint[];
  rows: PlottedRow[];
  /** Spacing beyond which the line is broken, ms. */
  gapMs: number;
}

/** Median of the spacings between consecutive times (0 for fewer than two). */
export function medianSpacing(xs: readonly number[]): number {
  if (xs.length < 2) return 0;
  const d: number[] = [];
  for (let i = 1; i < xs.length; i++) d.push(xs[i]! - xs[i - 1]!);
  d.sort((a, b) => a - b);
  const m = d.length >> 1;
  return d.length % 2 ? d[m]! : (d[m - 1]! + d[m]!) / 2;
}

/**
 * The spacing beyond which consecutive points are not joined (our own rule, so that a chart
 * never draws a line across a stretch where nothing was recorded, yet does not break on the
 * jitter of a healthy sample stream):
 * - raw readings: 3 × the median spacing, at least 1.5 s;
 * - buckets: the larger of 1.5 bucket widths (one empty bucket breaks the line) and 3 × the
 *   estimated sample spacing (median bucket spacing ÷ median readings per bucket), so a channel
 *   sampled more slowly than the bucket width is not broken at every empty bucket.
 */
export function gapThresholdMs(xs: readonly number[], bucketMs: number | null, counts: readonly number[] = []): number {
  const spacing = medianSpacing(xs);
  if (bucketMs === null) return Math.max(1500, 3 * spacing);
  const n = counts.length ? Math.max(1, medianOf(counts)) : 1;
  return Math.max(1.5 * bucketMs, (3 * spacing) / n);
}

function medianOf(values: readonly number[]): number {
  const v = [...values].sort((a, b) => a - b);
  const m = v.length >> 1;
  return v.length % 2 ? v[m]! : (v[m - 1]! + v[m]!) / 2;
}

/** The points with a `{x: midpoint, y: null}` break inserted wherever two neighbours lie more than `gapMs` apart. */
export function withGaps(points: readonly ChartPoint[], gapMs: number): ChartPoint[] {
  const out: ChartPoint[] = [];
  for (let i = 0; i < points.length; i++) {
    const p = points[i]!;
    const prev = points[i - 1];
    if (prev && p.x - prev.x > gapMs) out.push({ x: (prev.x + p.x) / 2, y: null });
    out.push(p);
  }
  return out;
}

/**
 * Shape the readings endpoint's answer: raw readings as one line; buckets as a mean line with a
 * min/max band, each bucket plotted at its middle (`t + bucketMs / 2`). Points are sorted by
 * time and the line breaks at gaps (see {@link gapThresholdMs}).
 */
export function shapeReadings(resp: ReadingsResponse): ShapedSeries {
  if (resp.mode === 'raw') {
    const pts = [...resp.points].filter((p) => Number.isFinite(p.v)).sort((a, b) => a.t - b.t);
    const gapMs = gapThresholdMs(
      pts.map((p) => p.t),
      null,
    );
    return {
      mode: 'raw',
      bucketMs: null,
      source: 'raw',
      line: withGaps(
        pts.map((p) => ({ x: p.t, y: p.v })),
        gapMs,
      ),
      min: [],
      max: [],
      rows: pts.map((p) => ({ x: p.t, value: p.v, ...(p.q !== undefined ? { quality: p.q } : {}) })),
      gapMs,
    };
  }
  const w = resp.bucketMs;
  const bs = [...resp.buckets].filter((b) => b.n > 0).sort((a, b) => a.t - b.t);
  const xs = bs.map((b) => b.t + w / 2);
  const gapMs = gapThresholdMs(
    xs,
    w,
    bs.map((b) => b.n),
  );
  const series = (pick: (b: (typeof bs)[number]) => number) =>
    withGaps(
      bs.map((b, i) => ({ x: xs[i]!, y: pick(b) })),
      gapMs,
    );
  return {
    mode: 'bucketed',
    bucketMs: w,
    source: resp.source,
    line: series((b) => b.mean),
    min: series((b) => b.min),
    max: series((b) => b.max),
    rows: bs.map((b, i) => ({
      x: xs[i]!,
      min: b.min,
      mean: b.mean,
      max: b.max,
      n: b.n,
      bucketStartMs: b.t,
      bucketEndMs: b.t + w,
    })),
    gapMs,
  };
}

// ---------------------------------------------------------------------------------------------
// Window steps over time

/** A stretch `[fromMs, toMs)` with one value in force. */
export interface Step<V> {
  fromMs: number;
  toMs: number;
  value: V;
}

/**
 * Steps over `[fromMs, toMs)` from samples of "what was in force from this instant on": each
 * sample holds until the next one; samples before `fromMs` only give the value at `fromMs`
 * (the latest such), samples at or after `toMs` are ignored, and neighbours that are `same`
 * merge into one step. Time before the first sample has no step.
 */
export function stepsFromSamples<V>(
  samples: readonly { tMs: number; value: V }[],
  fromMs: number,
  toMs: number,
  same: (a: V, b: V) => boolean,
): Step<V>[] {
  const sorted = [...samples].sort((a, b) => a.tMs - b.tMs);
  const out: Step<V>[] = [];
  for (let i = 0; i < sorted.length; i++) {
    const s = sorted[i]!;
    const next = sorted[i + 1]?.tMs ?? Number.POSITIVE_INFINITY;
    const start = Math.max(fromMs, s.tMs);
    const end = Math.min(toMs, next);
    if (!(end > start)) continue;
    const last = out[out.length - 1];
    if (last && last.toMs === start && same(last.value, s.value)) last.toMs = end;
    else out.push({ fromMs: start, toMs: end, value: s.value });
  }
  return out;
}

/** The window in force over one stretch, as the annotations endpoint sends it. */
export interface WindowSegment {
  fromMs: number;
  toMs: number;
  window: { id: number; version: number; name: string; limits: ProcessWindowLimits; effectiveFrom: string } | null;
}

/** A shaded window band for one channel over one stretch. */
export interface WindowBand {
  fromMs: number;
  toMs: number;
  min: number;
  max: number;
  target: number | null;
  lowApplies: WindowRange['lowApplies'];
  /** e.g. "Hard coat HC-300 on CR-39 v3". */
  label: string;
  windowId: number;
  version: number;
}

/**
 * The shaded bands of a channel from the window segments: stretches without a window, or whose
 * window has no field for this channel kind, give no band; neighbouring stretches with the
 * same limits merge (a new version with unchanged limits for this channel does not redraw).
 */
export function windowBands(segments: readonly WindowSegment[], kind: string): WindowBand[] {
  const out: WindowBand[] = [];
  for (const s of [...segments].sort((a, b) => a.fromMs - b.fromMs)) {
    const r = s.window ? windowRangeFor(kind, s.window.limits) : null;
    if (!r || !s.window) continue;
    const target = r.target ?? null;
    const last = out[out.length - 1];
    if (last && last.toMs === s.fromMs && last.min === r.min && last.max === r.max && last.target === target) {
      last.toMs = s.toMs;
      continue;
    }
    out.push({
      fromMs: s.fromMs,
      toMs: s.toMs,
      min: r.min,
      max: r.max,
      target,
      lowApplies: r.lowApplies,
      label: `${s.window.name} v${s.window.version}`,
      windowId: s.window.id,
      version: s.window.version,
    });
  }
  return out;
}

/** Instants inside the view where one band follows another (drawn as labelled vertical lines). */
export function windowChanges(bands: readonly WindowBand[]): { tMs: number; label: string }[] {
  const out: { tMs: number; label: string }[] = [];
  for (let i = 1; i < bands.length; i++) {
    const b = bands[i]!;
    out.push({ tMs: b.fromMs, label: `Window ${b.label} from here: ${b.min}–${b.max}` });
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Events as markers

export const TREND_EVENT_KINDS = [
  'alarm',
  'solvent-addition',
  'lacquer-addition',
  'filter-change',
  'door-open',
  'load-start',
  'load-end',
] as const;
export type TrendEventKind = (typeof TREND_EVENT_KINDS)[number];

/** One plant event near a channel (alarm, bath addition, filter change, door opening, load start/end). */
export interface TrendEvent {
  tMs: number;
  kind: TrendEventKind;
  label: string;
  detail?: string;
  priority?: 'high' | 'medium' | 'low';
}

/**
 * How each kind is drawn: its lane (rows under the plot), the chart.js point style (shape,
 * so colour is never the only signal) and words for one and several.
 */
export const EVENT_STYLE: Readonly<Record<TrendEventKind, { lane: number; shape: string; one: string; many: string }>> = {
  alarm: { lane: 0, shape: 'triangle', one: 'alarm', many: 'alarms' },
  'solvent-addition': { lane: 1, shape: 'circle', one: 'solvent addition', many: 'solvent additions' },
  'lacquer-addition': { lane: 1, shape: 'rectRounded', one: 'fresh-lacquer addition', many: 'fresh-lacquer additions' },
  'filter-change': { lane: 1, shape: 'rect', one: 'filter change', many: 'filter changes' },
  'door-open': { lane: 2, shape: 'rectRot', one: 'door opening', many: 'door openings' },
  'load-start': { lane: 3, shape: 'crossRot', one: 'load start', many: 'load starts' },
  'load-end': { lane: 3, shape: 'star', one: 'load end', many: 'load ends' },
};

/** A marker on the time axis: one event, or several of one kind close together. */
export interface Marker {
  x: number;
  lane: number;
  kind: TrendEventKind;
  count: number;
  label: string;
  /** The events behind the marker (at most 8, earliest first). */
  events: TrendEvent[];
  priority?: 'high' | 'medium' | 'low';
}

const PRIORITY_RANK = { high: 3, medium: 2, low: 1 } as const;

/**
 * Place events on the time axis: events outside `[fromMs, toMs]` are dropped; the range is cut
 * into `slots` equal slots (an event exactly at `toMs` counts in the last) and events of one
 * kind in one slot become one marker at the earliest event's time, labelled with the count
 * ("3 door openings") and carrying the highest alarm priority among them — so a month of door
 * openings stays readable instead of a solid smear.
 */
export function placeMarkers(events: readonly TrendEvent[], fromMs: number, toMs: number, slots = 150): Marker[] {
  if (!(toMs > fromMs)) return [];
  const n = Math.max(1, Math.floor(slots));
  const w = (toMs - fromMs) / n;
  const groups = new Map<string, TrendEvent[]>();
  for (const e of [...events].sort((a, b) => a.tMs - b.tMs)) {
    if (!(e.tMs >= fromMs && e.tMs <= toMs)) continue;
    const slot = Math.min(n - 1, Math.floor((e.tMs - fromMs) / w));
    const key = `${e.kind}|${slot}`;
    const g = groups.get(key);
    if (g) g.push(e);
    else groups.set(key, [e]);
  }
  const out: Marker[] = [];
  for (const g of groups.values()) {
    const first = g[0]!;
    const style = EVENT_STYLE[first.kind];
    let priority: Marker['priority'];
    for (const e of g)
      if (e.priority && (!priority || PRIORITY_RANK[e.priority] > PRIORITY_RANK[priority])) priority = e.priority;
    out.push({
      x: first.tMs,
      lane: style.lane,
      kind: first.kind,
      count: g.length,
      label: g.length === 1 ? first.label : `${g.length} ${style.many}`,
      events: g.slice(0, 8),
      ...(priority ? { priority } : {}),
    });
  }
  return out.sort((a, b) => a.x - b.x || a.lane - b.lane);
}

// ---------------------------------------------------------------------------------------------
// Axes and CSV

/** One y axis per unit, in order of first appearance; the first on the left, then alternating right/left. */
export function unitAxes(units: readonly string[]): { unit: string; id: string; position: 'left' | 'right' }[] {
  const seen: string[] = [];
  for (const u of units) if (!seen.includes(u)) seen.push(u);
  return seen.map((unit, i) => ({ unit, id: `y${i}`, position: i % 2 === 0 ? 'left' : 'right' }));
}

/** A plotted channel as the CSV export sees it. */
export interface CsvSeries {
  name: string;
  unit: string;
  shaped: Pick<ShapedSeries, 'mode' | 'bucketMs' | 'source' | 'rows'>;
}

export const TREND_CSV_HEADER = [
  'channel',
  'unit',
  'time',
  'zone',
  'kind',
  'value',
  'min',
  'mean',
  'max',
  'samples',
  'bucket_start',
  'bucket_end',
] as const;

const widthWords = (ms: number) =>
  ms % DAY_MS === 0
    ? `${ms / DAY_MS} d`
    : ms % HOUR_MS === 0
      ? `${ms / HOUR_MS} h`
      : ms % MINUTE_MS === 0
        ? `${ms / MINUTE_MS} min`
        : `${ms / 1000} s`;

/**
 * CSV of exactly the plotted series (RFC 4180 via csv-table): one row per reading or bucket;
 * times as ISO 8601 with the site's UTC offset plus the zone name; the unit on every row.
 * Bucketed rows name the bucket width and source ("bucket 1 h (hourly rollup)").
 */
export function trendCsv(series: readonly CsvSeries[], timeZone: string): string {
  const rows: unknown[][] = [];
  const sourceWords = { raw: 'raw readings', minute: 'minute rollup', hour: 'hourly rollup' } as const;
  for (const s of series) {
    const kind =
      s.shaped.mode === 'raw' ? 'reading' : `bucket ${widthWords(s.shaped.bucketMs ?? 0)} (${sourceWords[s.shaped.source]})`;
    for (const r of s.shaped.rows) {
      rows.push([
        s.name,
        s.unit,
        isoInZone(r.x, timeZone),
        `${timeZone} ${zoneAbbreviation(r.x, timeZone)}`,
        kind,
        r.value ?? '',
        r.min ?? '',
        r.mean ?? '',
        r.max ?? '',
        r.n ?? '',
        r.bucketStartMs !== undefined ? isoInZone(r.bucketStartMs, timeZone) : '',
        r.bucketEndMs !== undefined ? isoInZone(r.bucketEndMs, timeZone) : '',
      ]);
    }
  }
  return toCsv(TREND_CSV_HEADER, rows);
}

// ---------------------------------------------------------------------------------------------
// View range: presets, pan, zoom

export interface ViewRange {
  fromMs: number;
  toMs: number;
}

export const RANGE_PRESETS = [
  { key: '1h', label: 'Last hour', ms: HOUR_MS },
  { key: '8h', label: '8 h', ms: 8 * HOUR_MS },
  { key: '24h', label: '24 h', ms: DAY_MS },
  { key: '7d', label: '7 d', ms: 7 * DAY_MS },
  { key: '30d', label: '30 d', ms: 30 * DAY_MS },
  { key: '1y', label: '1 y', ms: 365 * DAY_MS },
] as const;
export type RangePresetKey = (typeof RANGE_PRESETS)[number]['key'];

/** Narrowest view, 1 minute; widest, 2 years. */
export const MIN_SPAN_MS = MINUTE_MS;
export const MAX_SPAN_MS = 730 * DAY_MS;

const clampSpan = (ms: number) => Math.min(MAX_SPAN_MS, Math.max(MIN_SPAN_MS, ms));

/** The preset's range ending at `nowMs`. */
export function presetRange(key: RangePresetKey, nowMs: number): ViewRange {
  const p = RANGE_PRESETS.find((r) => r.key === key) ?? RANGE_PRESETS[0];
  return { fromMs: nowMs - p.ms, toMs: nowMs };
}

/**
 * Zoom by `factor` (< 1 in, > 1 out) about `centerMs` (default the middle), keeping the centre
 * instant at the same place on screen; the span stays within 1 minute … 2 years.
 */
export function zoomRange(r: ViewRange, factor: number, centerMs?: number): ViewRange {
  const span = r.toMs - r.fromMs;
  const c = centerMs ?? (r.fromMs + r.toMs) / 2;
  const next = clampSpan(span * factor);
  const k = next / span;
  const fromMs = c - (c - r.fromMs) * k;
  return { fromMs: Math.round(fromMs), toMs: Math.round(fromMs + next) };
}

/** Move the view by `fraction` of its span (negative: back in time). */
export function panRange(r: ViewRange, fraction: number): ViewRange {
  const d = Math.round((r.toMs - r.fromMs) * fraction);
  return { fromMs: r.fromMs + d, toMs: r.toMs + d };
}

/** A view that does not reach past `nowMs` (shifted back, span kept) and keeps the span within bounds. */
export function clampToNow(r: ViewRange, nowMs: number): ViewRange {
  const span = clampSpan(r.toMs - r.fromMs);
  const toMs = Math.min(r.fromMs + span, nowMs);
  return { fromMs: toMs - span, toMs };
}

/** The view of `spanMs` centred on `atMs`. */
export function centredOn(atMs: number, spanMs: number): ViewRange {
  const span = clampSpan(spanMs);
  const fromMs = Math.round(atMs - span / 2);
  return { fromMs, toMs: fromMs + span };
}

/**
 * Points per series of a trend's first load: fixed (not measured from the plot) so the page can
 * preload exactly that request before the island's scripts arrive.
 */
export const INITIAL_MAX_POINTS = 1000;

/** Points to ask for per series: about one per pixel of plot width, between 100 and 2 000. */
export function maxPointsFor(widthPx: number): number {
  return Math.min(2000, Math.max(100, Math.round(Number.isFinite(widthPx) ? widthPx : 1000)));
}

/**
 * The trend page's query: `?at=<ms>` centres the view (1 hour unless `range` says otherwise),
 * `?from=&to=` (epoch ms) give a custom view, `?range=<preset>` a preset ending now (default
 * the last hour); `?add=3,7` adds channels. Unreadable values fall back to the defaults.
 */
export function parseTrendQuery(
  params: URLSearchParams,
  nowMs: number,
): { range: ViewRange; live: boolean; preset: RangePresetKey | null; at: number | null; add: number[] } {
  const num = (k: string) => {
    const v = params.get(k);
    if (v === null || v.trim() === '') return null;
    const n = Number(v);
    return Number.isFinite(n) ? n : null;
  };
  const presetKey = params.get('range');
  const preset = RANGE_PRESETS.find((p) => p.key === presetKey) ?? null;
  const add = (params.get('add') ?? '')
    .split(',')
    .map((s) => Number(s))
    .filter((n) => Number.isInteger(n) && n > 0)
    .slice(0, 7);
  const at = num('at');
  if (at !== null) return { range: centredOn(at, preset?.ms ?? HOUR_MS), live: false, preset: null, at, add };
  const from = num('from');
  const to = num('to');
  if (from !== null && to !== null && to > from) {
    return { range: { fromMs: from, toMs: Math.min(to, from + MAX_SPAN_MS) }, live: false, preset: null, at: null, add };
  }
  const p = preset ?? RANGE_PRESETS[0];
  return { range: presetRange(p.key, nowMs), live: true, preset: p.key, at: null, add };
}

// ---------------------------------------------------------------------------------------------
// The annotations endpoint (its query schema lives in trend-query.ts, so islands do not bundle zod)

/** Answer of the annotations endpoint: the window stretches and the events in the range. */
export interface AnnotationsResponse {
  channelId: number;
  from: number;
  to: number;
  windows: WindowSegment[];
  events: TrendEvent[];
  /** True when there were more events than the answer carries (the earliest are kept). */
  truncated: boolean;
}

/** The readings and annotations requests of a trend's first load (the page preloads them; the island then asks exactly these). */
export function initialTrendRequests(ids: readonly number[], r: ViewRange): string[] {
  const from = Math.round(r.fromMs);
  const to = Math.round(r.toMs);
  return ids.flatMap((id) => [
    `/api/v1/channels/${id}/readings?from=${from}&to=${to}&maxPoints=${INITIAL_MAX_POINTS}`,
    `/api/v1/channels/${id}/annotations?from=${from}&to=${to}`,
  ]);
}
