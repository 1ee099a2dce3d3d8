/**
 * Control-chart constants for subgroup sizes n = 2…25, computed from their definitions (not
 * copied from a table) once, when this module is loaded.
 *
 * Definitions (ASTM E2587 "Standard Practice for Use of Control Charts in Statistical Process
 * Control", factor tables; D. C. Montgomery, *Introduction to Statistical Quality Control*,
 * Appendix VI; NIST/SEMATECH e-Handbook §6.3.2):
 * - c4 = √(2/(n−1)) · Γ(n/2)/Γ((n−1)/2)  — E[s] = c4·σ for normal samples (via ln Γ for stability)
 * - d2 = E[W], d3 = SD[W] of the relative range W = R/σ of n normal observations, by numerical
 *   integration: d2 = ∫(1 − (1−Φ(x))ⁿ − Φ(x)ⁿ) dx and
 *   E[W²] = 2∬_{x<y} (1 − Φ(y)ⁿ − (1−Φ(x))ⁿ + (Φ(y)−Φ(x))ⁿ) dx dy, d3 = √(E[W²] − d2²)
 * - A2 = 3/(d2√n), A3 = 3/(c4√n), A = 3/√n, E2 = 3/d2 (individuals with moving ranges of span n)
 * - D3, D4 = max(0, 1 ∓ 3d3/d2); D1, D2 = max(0, d2 ∓ 3d3) (standards given)
 * - B3, B4 = max(0, 1 ∓ (3/c4)√(1−c4²)); B5, B6 = max(0, c4 ∓ 3√(1−c4²)) (standards given)
 */
import { logGamma, normalCdf } from './math.ts';

/** The control-chart factors for one subgroup size n (all dimensionless). */
export interface ControlChartConstants {
  /** Subgroup size. */
  n: number;
  /** E[R]/σ for normal samples. */
  d2: number;
  /** SD[R]/σ for normal samples. */
  d3: number;
  /** E[s]/σ for normal samples. */
  c4: number;
  /** X̄ chart factor from R̄: limits x̿ ± A2·R̄. */
  A2: number;
  /** X̄ chart factor from s̄: limits x̿ ± A3·s̄. */
  A3: number;
  /** X̄ chart factor, standards given: μ ± A·σ. */
  A: number;
  /** R chart factors from R̄: LCL = D3·R̄, UCL = D4·R̄. */
  D3: number;
  D4: number;
  /** R chart factors, standards given: LCL = D1·σ, UCL = D2·σ. */
  D1: number;
  D2: number;
  /** S chart factors from s̄: LCL = B3·s̄, UCL = B4·s̄. */
  B3: number;
  B4: number;
  /** S chart factors, standards given: LCL = B5·σ, UCL = B6·σ. */
  B5: number;
  B6: number;
  /** Individuals chart factor from the mean moving range: x̄ ± E2·MR̄ (E2 = 3/d2). */
  E2: number;
}

/** Smallest and largest subgroup size covered by the table. */
export const MIN_SUBGROUP_SIZE = 2;
export const MAX_SUBGROUP_SIZE = 25;

/**
 * c4(n) = √(2/(n−1)) · Γ(n/2)/Γ((n−1)/2), the bias factor of the sample standard deviation of n
 * normal observations (E[s] = c4·σ). Computed through ln Γ. Valid for any n ≥ 2.
 */
export function c4Of(n: number): number {
  return Math.sqrt(2 / (n - 1)) * Math.exp(logGamma(n / 2) - logGamma((n - 1) / 2));
}

// Integration grid for the relative range: Φ is tabulated once on x ∈ [−X_MAX, X_MAX + W_MAX].
const STEP = 0.025;
const X_MAX = 9;
const W_MAX = 12;
const D3_STRIDE = 4;
const GRID_START = -X_MAX;
const GRID_POINTS = Math.round((2 * X_MAX + W_MAX) / STEP) + 1;
let phiGrid: Float64Array | null = null;

function phiTable(): Float64Array {
  if (phiGrid) return phiGrid;
  const g = new Float64Array(GRID_POINTS);
  for (let i = 0; i < GRID_POINTS; i += 1) g[i] = normalCdf(GRID_START + i * STEP);
  phiGrid = g;
  return g;
}

/**
 * d2(n) = E[R/σ] = ∫_{−∞}^{∞} (1 − (1−Φ(x))ⁿ − Φ(x)ⁿ) dx for n normal observations
 * (Tippett 1925; ASTM E2587). Trapezoid rule on a 0.025 grid over [−9, 9]: the integrand is smooth
 * and decays like a normal tail, so the rule is accurate to better than 1e-10.
 */
export function d2Of(n: number): number {
  const phi = phiTable();
  const xPoints = Math.round((2 * X_MAX) / STEP) + 1;
  let sum = 0;
  for (let i = 0; i < xPoints; i += 1) {
    const F = phi[i] as number;
    sum += 1 - Math.pow(1 - F, n) - Math.pow(F, n);
  }
  return sum * STEP;
}

/**
 * d3(n) = SD[R/σ]: d3² = E[W²] − d2², with E[W²] = 2∬_{x<y} (1 − Φ(y)ⁿ − (1−Φ(x))ⁿ + (Φ(y)−Φ(x))ⁿ) dx dy.
 * Substituting y = x + w (w ≥ 0), the inner integral over x uses the trapezoid rule on [−9, 9] and
 * the outer one over w ∈ [0, 12] uses Simpson's rule, both with step 0.1 (within 1e-9 of a 0.025
 * grid for n ≥ 4; n = 2 and 3 use their closed forms, below).
 */
export function d3Of(n: number): number {
  // Closed forms where the grid is least accurate: n = 2, W = |X₁ − X₂| ⇒ d3 = √(2 − 4/π); n = 3,
  // Var W = 2(Var X₍₃₎ − Cov(X₍₁₎, X₍₃₎)) with E X₍₃₎² = 1 + √3/(2π), E X₍₃₎ = 3/(2√π) and the row
  // sums of the order statistics' covariance matrix equal to 1 (X̄ is independent of Xᵢ − X̄)
  // ⇒ d3 = √(2 + (3√3 − 9)/π) = 0.888368004 (the 0.1 grid gives 0.88836766).
  if (n === 2) return Math.sqrt(2 - 4 / Math.PI);
  if (n === 3) return Math.sqrt(2 + (3 * Math.sqrt(3) - 9) / Math.PI);
  const phi = phiTable();
  // Every D3_STRIDE-th grid point (step 0.1): d3 stays within 1e-8 of the fine-grid value and
  // the whole table builds in about 10 ms.
  const h = STEP * D3_STRIDE;
  const xPoints = Math.round((2 * X_MAX) / h) + 1;
  const wIntervals = Math.round(W_MAX / h);
  const total = Math.round((2 * X_MAX + W_MAX) / h) + 1;
  const F = new Float64Array(total);
  for (let i = 0; i < total; i += 1) F[i] = phi[i * D3_STRIDE] as number;
  // Φ(y)ⁿ and (1−Φ(x))ⁿ depend on one variable only: tabulate a prefix sum and a sum once.
  const upper = new Float64Array(total + 1);
  for (let i = 0; i < total; i += 1) upper[i + 1] = (upper[i] as number) + Math.pow(F[i] as number, n);
  let lowerSum = 0;
  for (let i = 0; i < xPoints; i += 1) lowerSum += Math.pow(1 - (F[i] as number), n);
  // (Φ(y)−Φ(x))ⁿ below 1e-17 cannot move the sum: skip those pairs.
  const minDiff = Math.pow(1e-17, 1 / n);
  let outer = 0;
  for (let j = 0; j <= wIntervals; j += 1) {
    let inner = xPoints - ((upper[j + xPoints] as number) - (upper[j] as number)) - lowerSum;
    for (let i = 0; i < xPoints; i += 1) {
      const diff = (F[i + j] as number) - (F[i] as number);
      if (diff > minDiff) inner += Math.pow(diff, n);
    }
    inner *= h;
    const weight = j === 0 || j === wIntervals ? 1 : j % 2 === 1 ? 4 : 2;
    outer += weight * inner;
  }
  const eW2 = (2 * outer * h) / 3;
  const d2 = d2Of(n);
  return Math.sqrt(eW2 - d2 * d2);
}

function build(n: number): ControlChartConstants {
  const d2 = d2Of(n);
  const d3 = d3Of(n);
  const c4 = c4Of(n);
  const rootN = Math.sqrt(n);
  const sSpread = Math.sqrt(1 - c4 * c4);
  return {
    n,
    d2,
    d3,
    c4,
    A2: 3 / (d2 * rootN),
    A3: 3 / (c4 * rootN),
    A: 3 / rootN,
    D3: Math.max(0, 1 - (3 * d3) / d2),
    D4: 1 + (3 * d3) / d2,
    D1: Math.max(0, d2 - 3 * d3),
    D2: d2 + 3 * d3,
    B3: Math.max(0, 1 - (3 / c4) * sSpread),
    B4: 1 + (3 / c4) * sSpread,
    B5: Math.max(0, c4 - 3 * sSpread),
    B6: c4 + 3 * sSpread,
    E2: 3 / d2,
  };
}

const TABLE: ReadonlyMap<number, ControlChartConstants> = (() => {
  const m = new Map<number, ControlChartConstants>();
  for (let n = MIN_SUBGROUP_SIZE; n <= MAX_SUBGROUP_SIZE; n += 1) m.set(n, Object.freeze(build(n)));
  return m;
})();

/**
 * The cached control-chart constants for subgroup size n (2 ≤ n ≤ 25, integer); throws a
 * RangeError outside that range (the input schema keeps requests inside it).
 */
export function chartConstants(n: number): ControlChartConstants {
  const row = TABLE.get(n);
  if (!row) throw new RangeError(`control-chart constants cover subgroup sizes 2…25, not ${n}`);
  return row;
}

/** Every cached row, n = 2…25, in order. */
export function allChartConstants(): ControlChartConstants[] {
  return [...TABLE.values()];
}
