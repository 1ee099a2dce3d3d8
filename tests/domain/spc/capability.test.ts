import { describe, expect, it } from 'vitest';
import {
  andersonDarling,
  andersonDarlingPValue,
  capabilityIndices,
  capabilityStudy,
  cpConfidenceInterval,
  cpkConfidenceInterval,
  expectedPpm,
  lag1Autocorrelation,
} from '../../../src/lib/domain/spc/capability.ts';

describe('capability indices — NIST/SEMATECH e-Handbook §6.1.6 example (USL 20, LSL 8, μ 16, σ 2)', () => {
  const ix = capabilityIndices({ n: 50, mean: 16, sigmaWithin: 2, sigmaOverall: 2 }, { lsl: 8, usl: 20 });
  it.each([
    ['cp', 1.0],
    ['cpk', 0.6667],
    ['cpu', 0.6667],
    ['cpl', 1.3333],
    ['pp', 1.0],
    ['ppk', 0.6667],
  ] as const)('%s = %f (4 dp as printed)', (key, value) => {
    expect(ix[key]).toBeCloseTo(value, 4);
  });
  it('Cpm with the mid-spec target 14: 12/(6·√(4 + 4)) = 0.7071', () => {
    expect(ix.cpm).toBeCloseTo(12 / (6 * Math.sqrt(8)), 10);
  });
  it('Cpm equals Pp for a process centred on target (Chan, Cheng & Spiring 1988)', () => {
    const centred = capabilityIndices({ n: 30, mean: 14, sigmaWithin: 2, sigmaOverall: 2 }, { lsl: 8, usl: 20 });
    expect(centred.cpm).toBeCloseTo(centred.pp ?? Number.NaN, 12);
  });
  it('expected ppm: above USL 10⁶(1 − Φ(2)) = 22750.13, below LSL 10⁶Φ(−4) = 31.67 (standard normal table, e.g. NIST §1.3.6.7.1)', () => {
    const ppm = expectedPpm(16, 2, { lsl: 8, usl: 20 });
    expect(ppm?.aboveUsl).toBeCloseTo(22750.13, 2);
    expect(ppm?.belowLsl).toBeCloseTo(31.67, 2);
    expect(ppm?.total).toBeCloseTo(22781.8, 1);
  });
});

describe('one-sided specifications', () => {
  it('upper limit only: Cp, Cpl, Pp and Cpm are null; Cpk = Cpu', () => {
    const ix = capabilityIndices({ n: 50, mean: 16, sigmaWithin: 2, sigmaOverall: 2.5 }, { usl: 20 });
    expect(ix.cp).toBeNull();
    expect(ix.cpl).toBeNull();
    expect(ix.pp).toBeNull();
    expect(ix.cpm).toBeNull();
    expect(ix.cpk).toBeCloseTo(0.6667, 4);
    expect(ix.ppk).toBeCloseTo(4 / 7.5, 12);
  });
  it('lower limit only: Cpk = Cpl, no Cp interval, ppm only below', () => {
    const xs = [10.1, 9.8, 10.3, 10.0, 9.9, 10.2, 10.1, 9.7, 10.4, 10.0, 9.9, 10.1];
    const cap = capabilityStudy(xs, 0.2, { lsl: 9 });
    expect(cap.cp).toBeNull();
    expect(cap.cpInterval).toBeNull();
    expect(cap.cpk).toBeCloseTo(cap.cpl ?? Number.NaN, 12);
    expect(cap.cpkInterval).not.toBeNull();
    expect(cap.ppmWithin?.aboveUsl).toBeNull();
    expect(cap.ppmWithin?.belowLsl).toBeGreaterThan(0);
  });
});

describe('confidence intervals', () => {
  it('Cpk by Bissell: n 45, Ĉpk 1.15 → 0.89 … 1.41 (Quality Digest, May 2000, "The Last Word", qualitydigest.com/may00/html/lastword.html)', () => {
    const ci = cpkConfidenceInterval(1.15, 45, 0.95);
    expect(ci?.lower).toBeCloseTo(0.89, 2);
    expect(ci?.upper).toBeCloseTo(1.41, 2);
  });
  it('Cpk by Bissell: n 20, Ĉpk 1.33 → 0.88 … 1.78 (Montgomery, Introduction to SQC, §8.3.5 example; from memory)', () => {
    const ci = cpkConfidenceInterval(1.33, 20, 0.95);
    expect(ci?.lower).toBeCloseTo(0.88, 2);
    expect(ci?.upper).toBeCloseTo(1.78, 2);
  });
  it('Cp by χ²: Ĉp 2.29, n 20 → 1.57 … 3.01 (Montgomery §8.3.5 example, USL 62, LSL 38, s 1.75; from memory)', () => {
    const ci = cpConfidenceInterval(2.29, 20, 0.95);
    expect(ci?.lower).toBeCloseTo(1.57, 2);
    expect(ci?.upper).toBeCloseTo(3.01, 2);
  });
  it('Cp interval equals Ĉp·√(χ²/(n−1)) with SciPy 1.17 chi2.ppf quantiles (independent computation)', () => {
    // scipy.stats.chi2.ppf(0.025, 24) = 12.401150217444435; ppf(0.975, 24) = 39.36407702660391
    const ci = cpConfidenceInterval(1.2, 25, 0.95);
    expect(ci?.lower).toBeCloseTo(1.2 * Math.sqrt(12.401150217444435 / 24), 10);
    expect(ci?.upper).toBeCloseTo(1.2 * Math.sqrt(39.36407702660391 / 24), 10);
  });
});

describe("Anderson–Darling normality (Stephens 1974; D'Agostino & Stephens 1986)", () => {
  it('A² for the NIST §6.3.2.2 flow rates = 0.30486 (independent computation: SciPy 1.17 stats.anderson)', () => {
    const ad = andersonDarling([49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1]);
    expect(ad?.a2).toBeCloseTo(0.3048580492709476, 8);
    expect(ad?.a2Adjusted).toBeCloseTo(0.3048580492709476 * (1 + 0.075 + 0.0225), 8);
    expect(ad?.normalAt5Percent).toBe(true);
  });
  it('A² for the NIST §6.3.2.4 EWMA data = 0.35054 (SciPy 1.17 stats.anderson)', () => {
    const xs = [
      52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1,
    ];
    expect(andersonDarling(xs)?.a2).toBeCloseTo(0.3505387376108011, 8);
  });
  it.each([
    [0.631, 0.1],
    [0.752, 0.05],
    [0.873, 0.025],
    [1.035, 0.01],
  ])("p-value at the published upper-tail point A*² = %f is ≈ %f (D'Agostino & Stephens Table 4.7, from memory)", (a, p) => {
    expect(andersonDarlingPValue(a)).toBeCloseTo(p, 2);
  });
  it('flags clearly non-normal data and needs at least 8 points', () => {
    const skewed = [1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 2, 2, 3, 5, 9, 20, 40, 80];
    expect(andersonDarling(skewed)?.normalAt5Percent).toBe(false);
    expect(andersonDarling([1, 2, 3, 4, 5, 6, 7])).toBeNull();
  });
});

describe('lag-1 autocorrelation warning', () => {
  it('r₁ of 1…10 is 57.75/82.5 = 0.7 (by hand) > 2/√10 = 0.632 → a positive-correlation warning', () => {
    const a = lag1Autocorrelation([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(a?.lag1).toBeCloseTo(0.7, 12);
    expect(a?.threshold).toBeCloseTo(2 / Math.sqrt(10), 12);
    expect(a?.warning).toMatch(/too narrow/);
  });
  it('an alternating series warns that limits are too wide', () => {
    const a = lag1Autocorrelation([1, -1, 1, -1, 1, -1, 1, -1, 1, -1, 1, -1]);
    expect(a?.lag1).toBeCloseTo(-11 / 12, 12);
    expect(a?.warning).toMatch(/too wide/);
  });
  it('no warning inside the band; null below 10 points', () => {
    const a = lag1Autocorrelation([49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1, 50.0, 49.5]);
    expect(Math.abs(a?.lag1 ?? 1)).toBeLessThan(a?.threshold ?? 0);
    expect(a?.warning).toBeNull();
    expect(lag1Autocorrelation([1, 2, 3])).toBeNull();
  });
});
