/**
 * Student t and Fisher F distributions for the measurement-system tests (bias t test, linearity
 * slope and intercept tests, the ANOVA interaction F test), from the regularized incomplete beta
 * function I_x(a, b) evaluated by its continued fraction (modified Lentz), as in Abramowitz &
 * Stegun 26.5.8 and Press et al., Numerical Recipes, §6.4.
 */
import { logGamma } from '../spc/math.ts';

const EPS = 1e-15;
const TINY = 1e-300;

function betaContinuedFraction(a: number, b: number, x: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 1000; m += 1) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return h;
}

/**
 * Regularized incomplete beta I_x(a, b) = B(x; a, b)/B(a, b), a, b > 0, 0 ≤ x ≤ 1
 * (A&S 26.5.8 continued fraction, with the symmetry I_x(a, b) = 1 − I_{1−x}(b, a)).
 */
export function regularizedBeta(x: number, a: number, b: number): number {
  if (!(a > 0 && b > 0)) throw new RangeError('incomplete beta needs a, b > 0');
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  const front = Math.exp(lnFront);
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** Student t cumulative distribution P(T ≤ t) with df > 0 degrees of freedom (A&S 26.7.1 via I_x). */
export function tCdf(t: number, df: number): number {
  if (!(df > 0)) throw new RangeError('t distribution needs df > 0');
  const tail = 0.5 * regularizedBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** Two-sided p-value of a t statistic: P(|T| ≥ |t|). */
export function tTwoSidedP(t: number, df: number): number {
  return regularizedBeta(df / (df + t * t), df / 2, 0.5);
}

/** Student t quantile: the t with P(T ≤ t) = p, 0 < p < 1 (bisection on tCdf to 1e-12). */
export function tQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError('t quantile needs 0 < p < 1');
  if (p === 0.5) return 0;
  if (p < 0.5) return -tQuantile(1 - p, df);
  let lo = 0;
  let hi = 1;
  while (tCdf(hi, df) < p) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, hi); i += 1) {
    const mid = (lo + hi) / 2;
    if (tCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Upper tail of Fisher's F with (d1, d2) degrees of freedom: P(F ≥ f) = I_{d2/(d2+d1 f)}(d2/2, d1/2) (A&S 26.6.2). */
export function fSurvival(f: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0)) throw new RangeError('F distribution needs d1, d2 > 0');
  if (f <= 0) return 1;
  return regularizedBeta(d2 / (d2 + d1 * f), d2 / 2, d1 / 2);
}
