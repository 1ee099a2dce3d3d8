/**
 * Gauge bias and linearity, AIAG *Measurement Systems Analysis* reference manual, 4th ed. (2010),
 * ch. III §B ("independent sample method" for bias; linearity by regression of the bias on the
 * reference value, with t tests of slope and intercept).
 */
import { tQuantile, tTwoSidedP } from './distributions.ts';

export interface BiasResult {
  n: number;
  mean: number;
  bias: number;
  /** Repeatability σ_r = s of the readings. */
  sdRepeatability: number;
  /** σ_b = σ_r/√n */
  seBias: number;
  t: number;
  df: number;
  p: number;
  /** (1 − α) confidence interval of the bias: bias ± t(1 − α/2, n − 1)·σ_b */
  ci: [number, number];
  /** 100·|bias|/processVariation when a process variation (6σ) or tolerance is given */
  pctBias: number | null;
  /** True when zero lies inside the interval: the bias is not statistically significant. */
  acceptable: boolean;
}

/**
 * Bias of a gauge from n ≥ 10 readings of one reference part (AIAG MSA 4th ed. III-B: the manual
 * asks for at least 10): t = bias/(s/√n) with n − 1 degrees of freedom.
 */
export function gaugeBias(
  readings: readonly number[],
  reference: number,
  opts: { alpha?: number; processVariation?: number } = {},
): BiasResult {
  const n = readings.length;
  if (n < 2) throw new RangeError('a bias study needs at least 2 readings (the manual asks for 10 or more)');
  if (!Number.isFinite(reference)) throw new RangeError('the reference value must be a number');
  const alpha = opts.alpha ?? 0.05;
  let s = 0;
  for (const v of readings) s += v;
  const mean = s / n;
  let ss = 0;
  for (const v of readings) ss += (v - mean) ** 2;
  const sd = Math.sqrt(ss / (n - 1));
  const bias = mean - reference;
  const se = sd / Math.sqrt(n);
  const df = n - 1;
  const t = se > 0 ? bias / se : bias === 0 ? 0 : Math.sign(bias) * Number.MAX_VALUE;
  const tc = tQuantile(1 - alpha / 2, df);
  const ci: [number, number] = [bias - tc * se, bias + tc * se];
  return {
    n,
    mean,
    bias,
    sdRepeatability: sd,
    seBias: se,
    t,
    df,
    p: se > 0 ? tTwoSidedP(t, df) : bias === 0 ? 1 : 0,
    ci,
    pctBias: opts.processVariation && opts.processVariation > 0 ? (100 * Math.abs(bias)) / opts.processVariation : null,
    acceptable: ci[0] <= 0 && 0 <= ci[1],
  };
}

export interface LinearityResult {
  /** slope a of bias = b + a·reference */
  slope: number;
  /** intercept b */
  intercept: number;
  rSquared: number;
  /** s = √(Σ(y − ŷ)²/(N − 2)) */
  s: number;
  seSlope: number;
  seIntercept: number;
  tSlope: number;
  tIntercept: number;
  df: number;
  tCritical: number;
  /** |t_slope| ≤ t(1 − α/2, N − 2): no significant linearity */
  linearityAcceptable: boolean;
  /** |t_intercept| ≤ t critical: no significant bias at reference 0 */
  biasAcceptable: boolean;
  /** The average bias at each reference. */
  biasByReference: { reference: number; n: number; averageBias: number }[];
  /** Linearity = |slope|·process variation (AIAG MSA 3rd ed.; %linearity = 100·|slope|), when a process variation is given */
  linearity: number | null;
}

/**
 * Linearity: least-squares line through every (reference, reading − reference) pair; the slope
 * and intercept tested against zero by t with N − 2 degrees of freedom (AIAG MSA 4th ed. III-B).
 */
export function gaugeLinearity(
  points: readonly { reference: number; reading: number }[],
  opts: { alpha?: number; processVariation?: number } = {},
): LinearityResult {
  const n = points.length;
  if (n < 3) throw new RangeError('a linearity study needs at least 3 readings');
  const alpha = opts.alpha ?? 0.05;
  let sx = 0;
  let sy = 0;
  const groups = new Map<number, { n: number; sum: number }>();
  for (const { reference, reading } of points) {
    if (!Number.isFinite(reference) || !Number.isFinite(reading))
      throw new RangeError('every reference and reading must be a number');
    const bias = reading - reference;
    sx += reference;
    sy += bias;
    const g = groups.get(reference) ?? { n: 0, sum: 0 };
    g.n += 1;
    g.sum += bias;
    groups.set(reference, g);
  }
  if (groups.size < 2) throw new RangeError('a linearity study needs at least 2 different reference values');
  const xb = sx / n;
  const yb = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (const { reference, reading } of points) {
    const dx = reference - xb;
    const dy = reading - reference - yb;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = yb - slope * xb;
  const sse = Math.max(0, syy - slope * sxy);
  const df = n - 2;
  const s = Math.sqrt(sse / df);
  const seSlope = s / Math.sqrt(sxx);
  const seIntercept = s * Math.sqrt(1 / n + (xb * xb) / sxx);
  const tc = tQuantile(1 - alpha / 2, df);
  const tSlope = seSlope > 0 ? slope / seSlope : 0;
  const tIntercept = seIntercept > 0 ? intercept / seIntercept : 0;
  return {
    slope,
    intercept,
    rSquared: syy > 0 ? (sxy * sxy) / (sxx * syy) : 1,
    s,
    seSlope,
    seIntercept,
    tSlope,
    tIntercept,
    df,
    tCritical: tc,
    linearityAcceptable: Math.abs(tSlope) <= tc,
    biasAcceptable: Math.abs(tIntercept) <= tc,
    biasByReference: [...groups.entries()]
      .sort((x, y) => x[0] - y[0])
      .map(([reference, g]) => ({ reference, n: g.n, averageBias: g.sum / g.n })),
    linearity: opts.processVariation && opts.processVariation > 0 ? Math.abs(slope) * opts.processVariation : null,
  };
}
