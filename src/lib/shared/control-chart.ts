/**
 * Data shaping for the control-chart view (pure; used by the island and its tests): the plotted
 * series by subgroup order, the centre line and control limits as each point was judged (so the
 * limits step where a new set took effect, and EWMA's exact limits widen as they should), the
 * optional 1σ/2σ zone lines, the companion R/S/MR chart with its limits, and the markers for
 * violating and excluded points. The x axis is the point index (control charts are read in
 * subgroup order; nights and weekends leave no gaps); times go in labels and tooltips.
 */
import { csvField } from './csv-table.ts';
import { isoInZone } from './time.ts';
import { violationLabel, type ChartPoint, type CharacteristicChart, type LimitSetView } from './characteristics.ts';

export interface ShapedControlChart {
  /** Point index (1-based, the x value) per plotted point. */
  x: number[];
  /** The plotted statistic (for CUSUM: C⁺). */
  value: number[];
  /** CUSUM only: −C⁻ (drawn below zero). */
  lower: (number | null)[] | null;
  center: (number | null)[];
  ucl: (number | null)[];
  lcl: (number | null)[];
  /** Zone lines centre ± 1σ and ± 2σ of the statistic, from the point's own limits (σ = (UCL − centre)/3). */
  zones: { plus1: (number | null)[]; minus1: (number | null)[]; plus2: (number | null)[]; minus2: (number | null)[] };
  dispersion: (number | null)[];
  dispersionCenter: (number | null)[];
  dispersionUcl: (number | null)[];
  dispersionLcl: (number | null)[];
  /** Points where the statistic signals (triangles with the rule ids) and excluded ones (hollow, "excluded"). */
  markers: ControlMarker[];
  /** Where a limit set starts on the chart (the first point judged under it). */
  steps: { x: number; version: number; setId: number }[];
}

export interface ControlMarker {
  /** Position in the arrays. */
  i: number;
  x: number;
  y: number;
  kind: 'violation' | 'excluded';
  /** Short label: rule ids, or "excluded". */
  label: string;
}

/** Signals of the plotted statistic (run rules, EWMA, CUSUM) — not those of the R/S/MR chart. */
export function locationSignals(violations: readonly string[]): string[] {
  return violations.filter((v) => !v.startsWith('dispersion-'));
}

/** Signals of the companion R/S/MR chart. */
export function dispersionSignals(violations: readonly string[]): string[] {
  return violations.filter((v) => v.startsWith('dispersion-'));
}

/** The 1σ and 2σ zone lines from a centre and UCL (σ of the statistic = (UCL − centre)/3). */
export function zoneLines(
  center: number | null,
  ucl: number | null,
): { plus1: number | null; minus1: number | null; plus2: number | null; minus2: number | null } {
  if (center === null || ucl === null) return { plus1: null, minus1: null, plus2: null, minus2: null };
  const s = (ucl - center) / 3;
  return { plus1: center + s, minus1: center - s, plus2: center + 2 * s, minus2: center - 2 * s };
}

/** Shape a chart's points (in index order) with the characteristic's limit sets. */
export function shapeControlChart(
  chart: CharacteristicChart,
  points: readonly ChartPoint[],
  sets: readonly LimitSetView[],
): ShapedControlChart {
  const byId = new Map(sets.map((s) => [s.id, s]));
  const out: ShapedControlChart = {
    x: [],
    value: [],
    lower: chart === 'cusum' ? [] : null,
    center: [],
    ucl: [],
    lcl: [],
    zones: { plus1: [], minus1: [], plus2: [], minus2: [] },
    dispersion: [],
    dispersionCenter: [],
    dispersionUcl: [],
    dispersionLcl: [],
    markers: [],
    steps: [],
  };
  let lastSet: number | null = null;
  points.forEach((p, i) => {
    const set = p.limitSetId !== null ? byId.get(p.limitSetId) : undefined;
    out.x.push(p.index);
    if (chart === 'cusum') {
      out.value.push(p.extra.cPlus ?? 0);
      out.lower!.push(p.extra.cMinus === undefined ? null : -p.extra.cMinus);
      out.center.push(p.limitSetId === null ? null : 0);
      out.ucl.push(p.limitSetId === null ? null : p.ucl);
      out.lcl.push(p.limitSetId === null ? null : p.lcl);
    } else {
      out.value.push(p.value);
      out.center.push(p.center);
      out.ucl.push(p.ucl);
      out.lcl.push(p.lcl);
    }
    const z = chart === 'cusum' ? zoneLines(null, null) : zoneLines(p.center, p.ucl);
    out.zones.plus1.push(z.plus1);
    out.zones.minus1.push(z.minus1);
    out.zones.plus2.push(z.plus2);
    out.zones.minus2.push(z.minus2);
    out.dispersion.push(p.dispersion);
    out.dispersionCenter.push(set?.dispersion?.center ?? null);
    out.dispersionUcl.push(set?.dispersion?.ucl ?? null);
    out.dispersionLcl.push(set?.dispersion?.lcl ?? null);
    // A step where the set changes between two plotted points (or at the chart's very first point);
    // the first point of a window that starts inside a set's reign is not a step.
    if (p.limitSetId !== null && set && (i > 0 ? p.limitSetId !== lastSet : p.index === 1))
      out.steps.push({ x: p.index, version: set.version, setId: set.id });
    lastSet = p.limitSetId;
    const location = locationSignals(p.violations);
    if (location.length > 0) out.markers.push({ i, x: p.index, y: out.value[i]!, kind: 'violation', label: location.join(', ') });
    else if (p.excluded) out.markers.push({ i, x: p.index, y: out.value[i]!, kind: 'excluded', label: 'excluded' });
  });
  return out;
}

/** Plain-words tooltip lines for one point. */
export function pointTooltip(
  p: ChartPoint,
  unit: string,
  chart: CharacteristicChart,
  timeZone: string,
  fmt: (x: number | null | undefined) => string,
): string[] {
  const lines = [`Point ${p.index} · ${isoInZone(p.tMs, timeZone).slice(0, 19).replace('T', ' ')} (${timeZone})`];
  if (chart === 'cusum')
    lines.push(
      `C⁺ ${fmt(p.extra.cPlus)} · C⁻ ${fmt(p.extra.cMinus)} ${unit} (decision interval ${fmt(p.ucl)})`,
      `Observation ${fmt(p.value)} ${unit}`,
    );
  else lines.push(`${fmt(p.value)} ${unit}${p.n > 1 ? ` (mean of ${p.n})` : ''}`);
  if (chart === 'ewma') lines.push(`Observation ${fmt(p.observation)} ${unit}`);
  if (p.dispersion !== null) lines.push(`Spread ${fmt(p.dispersion)} ${unit}`);
  if (p.limitSetId === null) lines.push('No approved limits were in force');
  else if (chart !== 'cusum') lines.push(`Centre ${fmt(p.center)} · UCL ${fmt(p.ucl)} · LCL ${fmt(p.lcl)} ${unit}`);
  for (const v of p.violations) lines.push(`▲ ${violationLabel(v)}`);
  if (p.excluded) lines.push(`○ Excluded: ${p.exclusionReason ?? ''}`);
  return lines;
}

/** The chart's data as CSV (RFC 4180), times as ISO 8601 with the site's offset. */
export function controlChartCsv(
  points: readonly ChartPoint[],
  unit: string,
  chart: CharacteristicChart,
  timeZone: string,
): string {
  const header = [
    'index',
    'time',
    `value_${unit}`,
    `observation_${unit}`,
    `spread_${unit}`,
    'n',
    `center_${unit}`,
    `ucl_${unit}`,
    `lcl_${unit}`,
    'violations',
    'excluded',
    'exclusion_reason',
    'limit_set_id',
  ];
  if (chart === 'cusum') header.push(`c_plus_${unit}`, `c_minus_${unit}`);
  const rows = points.map((p) => {
    const r: unknown[] = [
      p.index,
      isoInZone(p.tMs, timeZone),
      p.value,
      p.observation,
      p.dispersion,
      p.n,
      p.center,
      p.ucl,
      p.lcl,
      p.violations.join(' '),
      p.excluded ? 'yes' : '',
      p.exclusionReason ?? '',
      p.limitSetId,
    ];
    if (chart === 'cusum') r.push(p.extra.cPlus ?? null, p.extra.cMinus ?? null);
    return r;
  });
  return [header, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

/** The y range of the statistic chart, and which spec limits lie off it. */
export interface YRange {
  min: number;
  max: number;
  /** Spec lines drawn inside the range. */
  shown: ('lsl' | 'usl' | 'target')[];
  /** Spec limits so far outside the data and control limits that showing them would flatten the chart. */
  offScale: { key: 'lsl' | 'usl'; value: number; side: 'above' | 'below' }[];
}

/**
 * The y range from the plotted values and the control limits (5 % padding); a spec limit is
 * brought into range when it lies within `reach` × the span of the data and limits beyond them,
 * otherwise it is reported off scale (so the chart can say "USL 115 °C above the chart" instead of
 * squashing the points into a line).
 */
export function yRange(s: ShapedControlChart, spec: { lsl?: number; usl?: number; target?: number } | null, reach = 1.5): YRange {
  const ys: number[] = [];
  const add = (xs: readonly (number | null)[] | null) => {
    if (xs) for (const x of xs) if (x !== null && Number.isFinite(x)) ys.push(x);
  };
  add(s.value);
  add(s.lower);
  add(s.ucl);
  add(s.lcl);
  add(s.center);
  if (ys.length === 0) return { min: 0, max: 1, shown: [], offScale: [] };
  let lo = Math.min(...ys);
  let hi = Math.max(...ys);
  const span = hi - lo || Math.abs(hi) * 0.01 || 1;
  const shown: YRange['shown'] = [];
  const offScale: YRange['offScale'] = [];
  const consider = (key: 'lsl' | 'usl' | 'target', v: number | undefined) => {
    if (v === undefined) return;
    if (v >= lo - reach * span && v <= hi + reach * span) {
      shown.push(key);
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    } else if (key !== 'target') offScale.push({ key, value: v, side: v > hi ? 'above' : 'below' });
  };
  consider('lsl', spec?.lsl);
  consider('usl', spec?.usl);
  consider('target', spec?.target);
  const pad = (hi - lo || span) * 0.05;
  return { min: lo - pad, max: hi + pad, shown, offScale };
}
