import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareQuantile, erfc, logGamma, normalCdf, normalQuantile } from '../../../src/lib/domain/spc/math.ts';

describe('chi-square quantile (Wilson–Hilferty start, Newton refinement)', () => {
  it.each([
    // Published 3-dp table values (Montgomery, Introduction to SQC, Appendix III; also any χ² table).
    [0.025, 24, 12.401],
    [0.975, 24, 39.364],
    [0.025, 19, 8.907],
    [0.975, 19, 32.852],
    [0.95, 1, 3.841],
  ])('χ²(%f; %i) = %f (3 dp as printed)', (p, df, x) => {
    expect(chiSquareQuantile(p, df)).toBeCloseTo(x, 3);
  });
  it.each([
    // Independent computation: SciPy 1.17.1 scipy.stats.chi2.ppf.
    [0.025, 24, 12.401150217444435],
    [0.975, 24, 39.36407702660391],
    [0.05, 1, 0.003932140000019522],
    [0.005, 99, 66.51010530173737],
    [0.995, 99, 138.98678345093953],
    [0.5, 2, 1.386294361119891],
    [0.01, 5, 0.5542980767282772],
  ])('χ²(%f; %i) = %f to 1e-9 relative (SciPy chi2.ppf)', (p, df, x) => {
    expect(Math.abs(chiSquareQuantile(p, df) / x - 1)).toBeLessThan(1e-9);
  });
  it('inverts the CDF', () => {
    for (const df of [1, 3, 10, 50])
      for (const p of [0.001, 0.3, 0.9]) expect(chiSquareCdf(chiSquareQuantile(p, df), df)).toBeCloseTo(p, 12);
  });
});

describe('normal distribution and gamma function', () => {
  it('Φ⁻¹(0.975) = 1.959964 and Φ(1.96) = 0.9750 (standard normal table)', () => {
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6);
    expect(normalCdf(1.96)).toBeCloseTo(0.975, 4);
  });
  it('tails keep relative precision: Φ(−6) = 9.8659e-10 (SciPy norm.cdf(−6) = 9.865876450376946e-10)', () => {
    expect(normalCdf(-6) / 9.865876450376946e-10).toBeCloseTo(1, 9);
    expect(normalQuantile(normalCdf(-6))).toBeCloseTo(-6, 9);
  });
  it('erfc(0) = 1, erfc(1) = 0.157299207050285 (A&S Table 7.1)', () => {
    expect(erfc(0)).toBe(1);
    expect(erfc(1)).toBeCloseTo(0.157299207050285, 14);
  });
  it('ln Γ: Γ(5) = 24, Γ(½) = √π', () => {
    expect(logGamma(5)).toBeCloseTo(Math.log(24), 12);
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12);
  });
});
