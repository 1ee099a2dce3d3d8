/**
 * Shewhart charts: X̄-R, X̄-S, individuals/moving range (span 2), and the attribute charts p, np,
 * c and u. Statistics, limits from phase-1 data, standards-given limits, and per-point limits.
 *
 * Formulas (NIST/SEMATECH e-Handbook §6.3.2.1–6.3.2.2 and §6.3.3; Montgomery, *Introduction to
 * SQC*, ch. 6–7; ASTM E2587):
 * - X̄-R: σ̂ = R̄/d2; X̄ limits x̿ ± A2·R̄ (= x̿ ± 3σ̂/√n); R limits D3·R̄, D4·R̄.
 * - X̄-S: σ̂ = s̄/c4; X̄ limits x̿ ± A3·s̄; S limits B3·s̄, B4·s̄.
 * - Individuals: MRᵢ = |xᵢ − xᵢ₋₁|; σ̂ = MR̄/d2(2) = MR̄/1.128; limits x̄ ± E2·MR̄ = x̄ ± 2.66·MR̄;
 *   MR limits 0 and D4(2)·MR̄ = 3.267·MR̄.
 * - Standards given (μ, σ known): X̄ μ ± A·σ; R D1·σ, d2·σ, D2·σ; S B5·σ, c4·σ, B6·σ;
 *   individuals μ ± 3σ, MR 0, d2(2)σ, D2(2)σ.
 * - p: p̄ = ΣDᵢ/Σnᵢ; limits p̄ ± 3√(p̄(1−p̄)/nᵢ) per point. np: n·p̄ ± 3√(n·p̄(1−p̄)).
 *   c: c̄ ± 3√c̄. u: ū = Σcᵢ/Σnᵢ, limits ū ± 3√(ū/nᵢ) per point.
 * - An LCL that would be negative is set to 0 where the statistic cannot be negative (R, S, MR,
 *   p, np, c, u). Units: those of the plotted statistic (data units; fraction; count; count per unit).
 */
import type { SpcChart, SpcLimits, SpcLimitSet } from '../../shared/spc.ts';
import { chartConstants } from './constants.ts';
import { mean, range, sampleSd } from './math.ts';

/** Charts handled here. */
export type ShewhartChart = Extract<SpcChart, 'xbar-r' | 'xbar-s' | 'imr' | 'p' | 'np' | 'c' | 'u'>;

/** One plotted Shewhart point before limits are attached. */
export interface ShewhartStat {
  /** x̄, x, p, np, c or u. */
  value: number;
  /** R, S or MR (null for the first moving range and for attribute charts). */
  dispersion: number | null;
  /** Subgroup size, or units inspected / inspection units for attribute charts. */
  size: number;
  /** The raw count (attribute charts), else null. */
  count: number | null;
}

/** Raw data of one request. */
export interface SpcData {
  subgroups?: readonly (readonly number[])[] | undefined;
  values?: readonly number[] | undefined;
  counts?: readonly number[] | undefined;
  sizes?: readonly number[] | undefined;
}

/** Known parameters ("standards given"): centre μ0 / p0 / c0 / u0 and process σ. */
export interface KnownParameters {
  target?: number | undefined;
  sigma?: number | undefined;
}

/** A limit set with where its centre and sigma came from. */
export interface EstimatedLimitSet extends SpcLimitSet {
  centerSource: 'given' | 'phase1';
  sigmaSource: 'given' | 'phase1' | null;
}

/** Limits and zone sigma of one point. */
export interface PointLimits extends SpcLimits {
  /** Sigma of the plotted statistic at this point, (UCL − centre)/3. */
  sigma: number;
}

/**
 * Per-point statistics: X̄-R → (x̄ᵢ, Rᵢ); X̄-S → (x̄ᵢ, sᵢ); I-MR → (xᵢ, MRᵢ = |xᵢ − xᵢ₋₁|);
 * p → Dᵢ/nᵢ; np → Dᵢ; c → cᵢ; u → cᵢ/nᵢ. The c chart takes each count with size 1.
 */
export function shewhartStatistics(chart: ShewhartChart, data: SpcData): ShewhartStat[] {
  switch (chart) {
    case 'xbar-r':
    case 'xbar-s':
      return (data.subgroups ?? []).map((sg) => ({
        value: mean(sg),
        dispersion: chart === 'xbar-r' ? range(sg) : sampleSd(sg),
        size: sg.length,
        count: null,
      }));
    case 'imr': {
      const xs = data.values ?? [];
      return xs.map((x, i) => {
        const prev = xs[i - 1];
        return { value: x, dispersion: prev === undefined ? null : Math.abs(x - prev), size: 1, count: null };
      });
    }
    case 'p':
    case 'np':
    case 'u':
    case 'c': {
      const counts = data.counts ?? [];
      const sizes = data.sizes ?? [];
      return counts.map((d, i) => {
        const n = chart === 'c' ? 1 : (sizes[i] ?? 1);
        const value = chart === 'p' || chart === 'u' ? d / n : d;
        return { value, dispersion: null, size: n, count: d };
      });
    }
  }
}

function dispersionLimitsFromSigma(chart: 'xbar-r' | 'xbar-s' | 'imr', sigma: number, n: number): SpcLimits {
  const k = chartConstants(chart === 'imr' ? 2 : n);
  if (chart === 'xbar-s') return { center: k.c4 * sigma, ucl: k.B6 * sigma, lcl: k.B5 * sigma };
  return { center: k.d2 * sigma, ucl: k.D2 * sigma, lcl: k.D1 * sigma };
}

/**
 * Limits estimated from the points at `included` (0-based indexes, e.g. the phase-1 range minus
 * any exclusions), with `known.target` / `known.sigma` overriding the estimates (standards given).
 * For I-MR only moving ranges whose two observations are both included are averaged.
 * Assumes validated input (equal subgroup sizes 2…25 for X̄ charts, at least one usable point).
 */
export function estimateShewhartLimits(
  chart: ShewhartChart,
  stats: readonly ShewhartStat[],
  included: readonly number[],
  known: KnownParameters = {},
): EstimatedLimitSet {
  const inSet = new Set(included);
  const picked = included.map((i) => stats[i]).filter((s): s is ShewhartStat => s !== undefined);
  if (chart === 'xbar-r' || chart === 'xbar-s' || chart === 'imr') {
    const n = chart === 'imr' ? 1 : (picked[0]?.size ?? 2);
    let sigmaHat: number;
    if (chart === 'imr') {
      const mrs: number[] = [];
      for (const i of included) {
        const s = stats[i];
        if (s && s.dispersion !== null && inSet.has(i - 1)) mrs.push(s.dispersion);
      }
      sigmaHat = mrs.length > 0 ? mean(mrs) / chartConstants(2).d2 : 0;
    } else {
      const k = chartConstants(n);
      const dBar = mean(picked.map((s) => s.dispersion ?? 0));
      sigmaHat = chart === 'xbar-r' ? dBar / k.d2 : dBar / k.c4;
    }
    const center = known.target ?? mean(picked.map((s) => s.value));
    const sigma = known.sigma ?? sigmaHat;
    const half = (3 * sigma) / Math.sqrt(n);
    return {
      chart,
      center,
      ucl: center + half,
      lcl: center - half,
      sigma,
      subgroupSize: n,
      dispersion: dispersionLimitsFromSigma(chart, sigma, n),
      centerSource: known.target === undefined ? 'phase1' : 'given',
      sigmaSource: known.sigma === undefined ? 'phase1' : 'given',
    };
  }
  // Attribute charts.
  const totalCount = picked.reduce((a, s) => a + (s.count ?? 0), 0);
  const totalSize = picked.reduce((a, s) => a + s.size, 0);
  const meanSize = picked.length > 0 ? totalSize / picked.length : 1;
  const rate =
    known.target ??
    (chart === 'c' ? totalCount / Math.max(picked.length, 1) : totalCount / Math.max(totalSize, Number.MIN_VALUE));
  const base: SpcLimitSet = {
    chart,
    center: 0,
    ucl: 0,
    lcl: 0,
    sigma: null,
    subgroupSize: chart === 'c' ? 1 : meanSize,
    dispersion: null,
  };
  const { center, ucl, lcl } = attributeLimits(chart, rate, base.subgroupSize);
  return { ...base, center, ucl, lcl, centerSource: known.target === undefined ? 'phase1' : 'given', sigmaSource: null };
}

/** Attribute limits for a rate (p̄, c̄ or ū) and a sample size; LCL floored at 0. */
function attributeLimits(chart: 'p' | 'np' | 'c' | 'u', rate: number, n: number): PointLimits {
  let center: number;
  let sigma: number;
  switch (chart) {
    case 'p':
      center = rate;
      sigma = Math.sqrt((rate * (1 - rate)) / n);
      break;
    case 'np':
      center = n * rate;
      sigma = Math.sqrt(n * rate * (1 - rate));
      break;
    case 'c':
      center = rate;
      sigma = Math.sqrt(rate);
      break;
    case 'u':
      center = rate;
      sigma = Math.sqrt(rate / n);
      break;
  }
  return { center, ucl: center + 3 * sigma, lcl: Math.max(0, center - 3 * sigma), sigma };
}

/**
 * Standards-given limits from a known centre and σ (variables: μ0 ± 3σ/√n with the matching
 * dispersion limits) or a known rate p0 / c0 / u0 and a sample size (attributes).
 */
export function standardsGivenLimits(
  chart: ShewhartChart,
  target: number,
  sigma: number | null,
  subgroupSize: number,
): SpcLimitSet {
  if (chart === 'xbar-r' || chart === 'xbar-s' || chart === 'imr') {
    const s = sigma ?? 0;
    const n = chart === 'imr' ? 1 : subgroupSize;
    const half = (3 * s) / Math.sqrt(n);
    return {
      chart,
      center: target,
      ucl: target + half,
      lcl: target - half,
      sigma: s,
      subgroupSize: n,
      dispersion: dispersionLimitsFromSigma(chart, s, n),
    };
  }
  const l = attributeLimits(chart, target, subgroupSize);
  return { chart, center: l.center, ucl: l.ucl, lcl: l.lcl, sigma: null, subgroupSize, dispersion: null };
}

/**
 * Limits at one point. Variables charts: the set's constant limits. p and u: recomputed from the
 * centre and the point's sample size (the set's own limits when the size equals its reference
 * size). np and c: the set's constant limits. Zone sigma = (UCL − centre)/3.
 */
export function shewhartPointLimits(ls: SpcLimitSet, stat: ShewhartStat): PointLimits {
  if ((ls.chart === 'p' || ls.chart === 'u') && stat.size !== ls.subgroupSize) {
    return attributeLimits(ls.chart, ls.center, stat.size);
  }
  return { center: ls.center, ucl: ls.ucl, lcl: ls.lcl, sigma: (ls.ucl - ls.center) / 3 };
}

const LABEL: Record<ShewhartChart, string> = {
  'xbar-r': 'subgroup mean',
  'xbar-s': 'subgroup mean',
  imr: 'value',
  p: 'fraction nonconforming',
  np: 'number nonconforming',
  c: 'count',
  u: 'count per unit',
};
const DISPERSION_LABEL: Record<ShewhartChart, string> = {
  'xbar-r': 'range',
  'xbar-s': 'standard deviation',
  imr: 'moving range',
  p: '',
  np: '',
  c: '',
  u: '',
};

function fmt(x: number): string {
  return Number(x.toPrecision(6)).toString();
}

/**
 * Why a point falls outside the given limits (strictly beyond, location or dispersion chart), in
 * plain words, or null when it is inside. Used for phase-1 exclusion suggestions.
 */
export function shewhartOutsideReason(ls: SpcLimitSet, stat: ShewhartStat): string | null {
  const chart = ls.chart as ShewhartChart;
  const pl = shewhartPointLimits(ls, stat);
  const reasons: string[] = [];
  if (stat.value > pl.ucl) reasons.push(`${LABEL[chart]} ${fmt(stat.value)} is above the UCL ${fmt(pl.ucl)}`);
  if (stat.value < pl.lcl) reasons.push(`${LABEL[chart]} ${fmt(stat.value)} is below the LCL ${fmt(pl.lcl)}`);
  if (ls.dispersion && stat.dispersion !== null) {
    if (stat.dispersion > ls.dispersion.ucl)
      reasons.push(`${DISPERSION_LABEL[chart]} ${fmt(stat.dispersion)} is above its UCL ${fmt(ls.dispersion.ucl)}`);
    if (stat.dispersion < ls.dispersion.lcl)
      reasons.push(`${DISPERSION_LABEL[chart]} ${fmt(stat.dispersion)} is below its LCL ${fmt(ls.dispersion.lcl)}`);
  }
  return reasons.length > 0 ? reasons.join('; ') : null;
}
