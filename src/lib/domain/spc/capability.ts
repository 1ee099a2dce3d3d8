/**
 * Process capability and the checks that make it meaningful: normality (Anderson–Darling) and
 * independence (lag-1 autocorrelation).
 *
 * Indices (NIST/SEMATECH e-Handbook §6.1.6; Montgomery, *Introduction to SQC*, ch. 8; V. E. Kane,
 * J. Quality Technology 18(1), 1986):
 * - Cp = (USL − LSL)/(6σ_within); Cpu = (USL − μ)/(3σ_within); Cpl = (μ − LSL)/(3σ_within);
 *   Cpk = min(Cpu, Cpl) (the one available side for a one-sided specification; Cp is then null).
 * - Pp, Ppu, Ppl, Ppk: the same with the overall sample standard deviation s.
 * - Cpm = (USL − LSL)/(6√(s² + (x̄ − T)²)) (Chan, Cheng & Spiring, J. Quality Technology 20(3),
 *   1988, in the estimator form Montgomery gives, Ĉpm = Ĉp/√(1 + V²), V = (x̄ − T)/s); T is the
 *   spec target, or the mid-specification when none is given. Needs both limits.
 * - Confidence interval for Cp from the χ² distribution of s² with n − 1 degrees of freedom:
 *   Ĉp·√(χ²(α/2; n−1)/(n−1)) ≤ Cp ≤ Ĉp·√(χ²(1−α/2; n−1)/(n−1)) (Montgomery §8.3.5).
 * - Confidence interval for Cpk by Bissell's normal approximation (A. F. Bissell, Applied
 *   Statistics 39(3), 1990): Ĉpk ± z(1−α/2)·√(1/(9n) + Ĉpk²/(2(n−1))).
 *   Both intervals take the degrees of freedom of the σ estimate: n − 1 for a sample standard
 *   deviation, and for R̄/d2, S̄/c4 or MR̄/d2 the effective degrees of freedom ν = 1/(2·CV²) of
 *   the estimator (the χ² variable with the same relative variance; Patnaik, Biometrika 37, 1950),
 *   see {@link effectiveDegreesOfFreedom}. Bissell's 1/(9n) term (the mean) keeps n.
 * - Confidence interval for Cpm (Chan, Cheng & Spiring 1988; Boyles, JQT 23(1), 1991): with
 *   δ = (x̄ − T)/s and ν = n(1 + δ²)²/(1 + 2δ²), Ĉpm·√(χ²(α/2; ν)/ν) ≤ Cpm ≤ Ĉpm·√(χ²(1−α/2; ν)/ν).
 * - Expected nonconforming, ppm: 10⁶·Φ((LSL − μ)/σ) below and 10⁶·(1 − Φ((USL − μ)/σ)) above,
 *   with σ_within ("within") or s ("overall"); normal model.
 * Units: indices dimensionless; ppm parts per million; μ, σ, limits in data units.
 */
import type { SpcAutocorrelation, SpcCapability, SpcInterval, SpcNormality, SpcPpm } from '../../shared/spc.ts';
import { chartConstants } from './constants.ts';
import { chiSquareQuantile, mean, normalCdf, normalQuantile, sampleSd } from './math.ts';

/** Specification limits (data units); at least one of lsl/usl. */
export interface SpecLimits {
  lsl?: number | undefined;
  usl?: number | undefined;
  target?: number | undefined;
}

/** Summary statistics that capability indices are computed from. */
export interface CapabilityMoments {
  n: number;
  mean: number;
  sigmaWithin: number;
  sigmaOverall: number;
}

/** The capability indices alone (see the module comment for the formulas). */
export interface CapabilityIndices {
  cp: number | null;
  cpu: number | null;
  cpl: number | null;
  cpk: number | null;
  pp: number | null;
  ppu: number | null;
  ppl: number | null;
  ppk: number | null;
  cpm: number | null;
}

function sideIndices(mu: number, sigma: number, lsl: number | undefined, usl: number | undefined) {
  if (!(sigma > 0)) return { p: null, u: null, l: null, k: null };
  const p = lsl !== undefined && usl !== undefined ? (usl - lsl) / (6 * sigma) : null;
  const u = usl !== undefined ? (usl - mu) / (3 * sigma) : null;
  const l = lsl !== undefined ? (mu - lsl) / (3 * sigma) : null;
  const k = u !== null && l !== null ? Math.min(u, l) : (u ?? l);
  return { p, u, l, k };
}

/**
 * Cp, Cpu, Cpl, Cpk (σ_within), Pp, Ppu, Ppl, Ppk (s overall) and Cpm from summary moments.
 * Null where undefined: Cp, Pp and Cpm need both limits; every index needs a positive sigma.
 * Check (NIST e-Handbook §6.1.6): USL 20, LSL 8, μ 16, σ 2 → Cp 1.0, Cpk 0.6667, Cpu 0.6667, Cpl 1.3333.
 */
export function capabilityIndices(m: CapabilityMoments, spec: SpecLimits): CapabilityIndices {
  const w = sideIndices(m.mean, m.sigmaWithin, spec.lsl, spec.usl);
  const o = sideIndices(m.mean, m.sigmaOverall, spec.lsl, spec.usl);
  let cpm: number | null = null;
  if (spec.lsl !== undefined && spec.usl !== undefined && m.sigmaOverall >= 0) {
    const t = spec.target ?? (spec.lsl + spec.usl) / 2;
    const tau = Math.sqrt(m.sigmaOverall * m.sigmaOverall + (m.mean - t) * (m.mean - t));
    cpm = tau > 0 ? (spec.usl - spec.lsl) / (6 * tau) : null;
  }
  return { cp: w.p, cpu: w.u, cpl: w.l, cpk: w.k, pp: o.p, ppu: o.u, ppl: o.l, ppk: o.k, cpm };
}

/** How σ_within was estimated: the input of {@link effectiveDegreesOfFreedom}. */
export type SigmaBasis =
  | { method: 'sample-sd'; n: number }
  | { method: 'rbar'; subgroups: number; size: number }
  | { method: 'sbar'; subgroups: number; size: number }
  | { method: 'mrbar'; observations: number }
  | { method: 'given'; degreesOfFreedom: number };

/**
 * Effective degrees of freedom ν of a σ estimate: the ν for which σ·√(χ²_ν/ν) has the same
 * relative variance as the estimator, ν = 1/(2·CV²) (Patnaik's χ² approximation to the range,
 * Biometrika 37, 1950):
 * - sample SD of n: n − 1 (exact);
 * - R̄/d2 over k subgroups of n: CV² = d3²/(k·d2²) ⇒ ν = k·d2²/(2·d3²) (≈ 0.9·k·(n − 1));
 * - S̄/c4 over k subgroups of n: CV² = (1 − c4²)/(k·c4²) ⇒ ν = k·c4²/(2(1 − c4²));
 * - MR̄/d2 over m individuals (m − 1 moving ranges of two): Var |Xᵢ − Xᵢ₊₁| = 2σ²(1 − 2/π),
 *   neighbouring ranges share a point (correlation of the differences −½), Cov = (4σ²/π)·
 *   (√3/2 + (π/6)/2 − 1); Var(MR̄) = [(m − 1)·V + 2(m − 2)·C]/(m − 1)² and CV² = Var(MR̄)/(E MR)²,
 *   E MR = 2σ/√π. For large m, ν ≈ 0.605·(m − 1).
 */
export function effectiveDegreesOfFreedom(basis: SigmaBasis): number {
  switch (basis.method) {
    case 'sample-sd':
      return basis.n - 1;
    case 'given':
      return basis.degreesOfFreedom;
    case 'rbar': {
      const k = chartConstants(basis.size);
      return (basis.subgroups * k.d2 * k.d2) / (2 * k.d3 * k.d3);
    }
    case 'sbar': {
      const c4 = chartConstants(basis.size).c4;
      return (basis.subgroups * c4 * c4) / (2 * (1 - c4 * c4));
    }
    case 'mrbar': {
      const m = basis.observations;
      if (m < 2) return 0;
      const v = 2 * (1 - 2 / Math.PI);
      const c = (4 / Math.PI) * (Math.sqrt(3) / 2 + Math.PI / 12 - 1);
      const varMr = ((m - 1) * v + 2 * Math.max(0, m - 2) * c) / ((m - 1) * (m - 1));
      const cv2 = varMr / (4 / Math.PI);
      return 1 / (2 * cv2);
    }
  }
}

/**
 * Two-sided confidence interval for Cpm (Chan, Cheng & Spiring 1988; Boyles 1991):
 * ν = n(1 + δ²)²/(1 + 2δ²), δ = (x̄ − T)/s; [Ĉpm·√(χ²(α/2; ν)/ν), Ĉpm·√(χ²(1−α/2; ν)/ν)].
 * Null without a finite Ĉpm, n < 2 or s ≤ 0.
 */
export function cpmConfidenceInterval(
  cpmHat: number,
  n: number,
  mean: number,
  sd: number,
  target: number,
  confidence = 0.95,
): SpcInterval | null {
  if (!(n >= 2) || !Number.isFinite(cpmHat) || !(sd > 0)) return null;
  const d2 = ((mean - target) / sd) ** 2;
  const nu = (n * (1 + d2) ** 2) / (1 + 2 * d2);
  const alpha = 1 - confidence;
  return {
    lower: cpmHat * Math.sqrt(chiSquareQuantile(alpha / 2, nu) / nu),
    upper: cpmHat * Math.sqrt(chiSquareQuantile(1 - alpha / 2, nu) / nu),
    confidence,
  };
}

/**
 * Two-sided confidence interval for Cp from the χ² quantiles with n − 1 degrees of freedom:
 * [Ĉp·√(χ²(α/2; n−1)/(n−1)), Ĉp·√(χ²(1−α/2; n−1)/(n−1))], α = 1 − confidence (Montgomery §8.3.5);
 * with σ from R̄, S̄ or MR̄ pass the effective degrees of freedom instead of n − 1.
 */
export function cpConfidenceInterval(cpHat: number, n: number, confidence = 0.95, degreesOfFreedom = n - 1): SpcInterval | null {
  if (!(n >= 2) || !Number.isFinite(cpHat) || !(degreesOfFreedom > 0)) return null;
  const alpha = 1 - confidence;
  const df = degreesOfFreedom;
  return {
    lower: cpHat * Math.sqrt(chiSquareQuantile(alpha / 2, df) / df),
    upper: cpHat * Math.sqrt(chiSquareQuantile(1 - alpha / 2, df) / df),
    confidence,
  };
}

/**
 * Two-sided confidence interval for Cpk (or a one-sided Cpu/Cpl) by Bissell (1990):
 * Ĉpk ± z(1−α/2)·√(1/(9n) + Ĉpk²/(2(n−1))); n − 1 becomes the σ estimate's effective
 * degrees of freedom when σ comes from R̄, S̄ or MR̄.
 * Published check (Quality Digest, May 2000, "The Last Word"): n = 45, Ĉpk = 1.15 → 0.89 … 1.41.
 */
export function cpkConfidenceInterval(
  cpkHat: number,
  n: number,
  confidence = 0.95,
  degreesOfFreedom = n - 1,
): SpcInterval | null {
  if (!(n >= 2) || !Number.isFinite(cpkHat) || !(degreesOfFreedom > 0)) return null;
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const half = z * Math.sqrt(1 / (9 * n) + (cpkHat * cpkHat) / (2 * degreesOfFreedom));
  return { lower: cpkHat - half, upper: cpkHat + half, confidence };
}

/** Expected ppm outside the specification for a normal(μ, σ) process; null when σ ≤ 0. */
export function expectedPpm(mu: number, sigma: number, spec: SpecLimits): SpcPpm | null {
  if (!(sigma > 0)) return null;
  const below = spec.lsl !== undefined ? 1e6 * normalCdf((spec.lsl - mu) / sigma) : null;
  const above = spec.usl !== undefined ? 1e6 * normalCdf((mu - spec.usl) / sigma) : null;
  return { belowLsl: below, aboveUsl: above, total: (below ?? 0) + (above ?? 0) };
}

/** Fewest observations for the Anderson–Darling check (the p-value approximations are for n ≥ 8). */
export const ANDERSON_DARLING_MIN_N = 8;

/**
 * Anderson–Darling test of normality with mean and variance estimated from the data
 * (M. A. Stephens, JASA 69, 1974; R. B. D'Agostino & M. A. Stephens, *Goodness-of-Fit Techniques*,
 * 1986, §4.8 and Table 4.9):
 * A² = −n − (1/n)·Σ(2i − 1)[ln Φ(zᵢ) + ln(1 − Φ(z₍ₙ₊₁₋ᵢ₎))], zᵢ = (x₍ᵢ₎ − x̄)/s sorted;
 * A*² = A²·(1 + 0.75/n + 2.25/n²); p-value piecewise:
 * A*² ≥ 0.6: exp(1.2937 − 5.709A*² + 0.0186A*⁴); 0.34 ≤ A*² < 0.6: exp(0.9177 − 4.279A*² − 1.38A*⁴);
 * 0.2 ≤ A*² < 0.34: 1 − exp(−8.318 + 42.796A*² − 59.938A*⁴); A*² < 0.2: 1 − exp(−13.436 + 101.14A*² − 223.73A*⁴).
 * Returns null for n < 8 or zero spread.
 */
export function andersonDarling(xs: readonly number[]): SpcNormality | null {
  const n = xs.length;
  if (n < ANDERSON_DARLING_MIN_N) return null;
  const m = mean(xs);
  const s = sampleSd(xs);
  if (!(s > 0)) return null;
  const z = [...xs].sort((a, b) => a - b).map((x) => (x - m) / s);
  let sum = 0;
  for (let i = 0; i < n; i += 1) {
    const lo = normalCdf(z[i] as number);
    const hiTail = normalCdf(-(z[n - 1 - i] as number)); // 1 − Φ(z₍ₙ₊₁₋ᵢ₎), computed without cancellation
    sum += (2 * (i + 1) - 1) * (Math.log(lo) + Math.log(hiTail));
  }
  const a2 = -n - sum / n;
  const a = a2 * (1 + 0.75 / n + 2.25 / (n * n));
  const p = andersonDarlingPValue(a);
  return { method: 'anderson-darling', n, a2, a2Adjusted: a, pValue: p, normalAt5Percent: p >= 0.05 };
}

/** Largest A*² for which the D'Agostino–Stephens fit is used; above it the p-value is 0 (p < 4e-24). */
export const ANDERSON_DARLING_FIT_MAX = 10;

/**
 * p-value of the adjusted Anderson–Darling statistic A*² for a normal sample with estimated mean
 * and variance (D'Agostino & Stephens 1986, Table 4.9; piecewise formulas in the comment of
 * `andersonDarling`), clamped to [0, 1]; 0 above A*² = 10, where the fit no longer applies (it
 * would rise back to 1 past A*² ≈ 307 and call grossly non-normal data normal).
 */
export function andersonDarlingPValue(a: number): number {
  let p: number;
  // The A*² ≥ 0.6 fit is a quadratic in A*² with its minimum near 153; it is fitted to moderate
  // values only (D'Agostino & Stephens' table stops near 1.2, the fit is used to about 10), and
  // beyond ~307 it climbs back above 1. Above 10 the true p is below the fit's 4e-24: report 0.
  if (a > ANDERSON_DARLING_FIT_MAX) p = 0;
  else if (a >= 0.6) p = Math.exp(1.2937 - 5.709 * a + 0.0186 * a * a);
  else if (a >= 0.34) p = Math.exp(0.9177 - 4.279 * a - 1.38 * a * a);
  else if (a >= 0.2) p = 1 - Math.exp(-8.318 + 42.796 * a - 59.938 * a * a);
  else p = 1 - Math.exp(-13.436 + 101.14 * a - 223.73 * a * a);
  return Math.min(1, Math.max(0, p));
}

/** Fewest points for the lag-1 autocorrelation check. */
export const AUTOCORRELATION_MIN_N = 10;

/**
 * Lag-1 sample autocorrelation r₁ = Σ(xₜ − x̄)(xₜ₊₁ − x̄)/Σ(xₜ − x̄)² of a series in time order
 * (G. E. P. Box & G. M. Jenkins, *Time Series Analysis*, 1970, §2.1; Montgomery §10.4). For
 * independent data r₁ stays within ±2/√n about 95 % of the time, so |r₁| > 2/√n earns a
 * plain-words warning: Shewhart limits assume independent points, and correlated data make them
 * mislead (too many false alarms when r₁ > 0, missed shifts when r₁ < 0). Null for n < 10 or no spread.
 */
export function lag1Autocorrelation(series: readonly number[]): SpcAutocorrelation | null {
  const n = series.length;
  if (n < AUTOCORRELATION_MIN_N) return null;
  const m = mean(series);
  let num = 0;
  let den = 0;
  for (let t = 0; t < n; t += 1) {
    const d = (series[t] as number) - m;
    den += d * d;
    const next = series[t + 1];
    if (next !== undefined) num += d * (next - m);
  }
  if (!(den > 0)) return null;
  const r1 = num / den;
  const threshold = 2 / Math.sqrt(n);
  let warning: string | null = null;
  if (Math.abs(r1) > threshold) {
    const r = r1.toFixed(2);
    const band = threshold.toFixed(2);
    warning =
      r1 > 0
        ? `Successive points are correlated (lag-1 r = ${r}, beyond the ±${band} that independent data stay within). ` +
          'Control limits assume each point is independent of the last; with positive correlation the limits are too narrow ' +
          'and the chart will raise false alarms and show runs that are not special causes. ' +
          'Sample less often, chart the residuals of a time-series model, or use an EWMA of residuals before acting on signals.'
        : `Successive points alternate (lag-1 r = ${r}, beyond the ±${band} that independent data stay within). ` +
          'Control limits assume each point is independent of the last; with negative correlation the moving range ' +
          'overstates sigma, the limits are too wide and real shifts can be missed. Look for over-adjustment or two alternating streams.';
  }
  return { n, lag1: r1, threshold, warning };
}

/**
 * Full capability study of individual observations against a specification: indices from the mean
 * and the given σ_within, overall s from the data, intervals (degrees of freedom from
 * `sigmaBasis`, default a sample SD of all observations: n − 1),
 * expected ppm, Anderson–Darling normality and, when `series` is given, lag-1 autocorrelation of
 * the plotted series in time order.
 */
export function capabilityStudy(
  observations: readonly number[],
  sigmaWithin: number,
  spec: SpecLimits,
  options: { confidence?: number; series?: readonly number[]; sigmaBasis?: SigmaBasis } = {},
): SpcCapability {
  const n = observations.length;
  const mu = mean(observations);
  const sOverall = n >= 2 ? sampleSd(observations) : 0;
  const confidence = options.confidence ?? 0.95;
  const ix = capabilityIndices({ n, mean: mu, sigmaWithin, sigmaOverall: sOverall }, spec);
  const basis = options.sigmaBasis ?? { method: 'sample-sd', n };
  const df = effectiveDegreesOfFreedom(basis);
  const target = spec.target ?? (spec.lsl !== undefined && spec.usl !== undefined ? (spec.lsl + spec.usl) / 2 : null);
  return {
    lsl: spec.lsl ?? null,
    usl: spec.usl ?? null,
    target: spec.target ?? (spec.lsl !== undefined && spec.usl !== undefined ? (spec.lsl + spec.usl) / 2 : null),
    n,
    mean: mu,
    sigmaWithin,
    sigmaOverall: sOverall,
    cp: ix.cp,
    cpk: ix.cpk,
    cpu: ix.cpu,
    cpl: ix.cpl,
    pp: ix.pp,
    ppk: ix.ppk,
    ppu: ix.ppu,
    ppl: ix.ppl,
    cpm: ix.cpm,
    cpInterval: ix.cp === null ? null : cpConfidenceInterval(ix.cp, n, confidence, df),
    cpkInterval: ix.cpk === null ? null : cpkConfidenceInterval(ix.cpk, n, confidence, df),
    cpmInterval: ix.cpm === null || target === null ? null : cpmConfidenceInterval(ix.cpm, n, mu, sOverall, target, confidence),
    sigmaBasis: { method: basis.method, degreesOfFreedom: df },
    ppmWithin: expectedPpm(mu, sigmaWithin, spec),
    ppmOverall: expectedPpm(mu, sOverall, spec),
    normality: andersonDarling(observations),
    autocorrelation: lag1Autocorrelation(options.series ?? observations),
  };
}
