/**
 * Independent checks of the SPC maths: closed forms, a reference library (jstat 1.9.6),
 * Monte-Carlo simulation with a seeded generator, and properties (fast-check). Each expected
 * value names where it comes from.
 */
import fc from 'fast-check';
import { jStat } from 'jstat';
import { describe, expect, it } from 'vitest';
import {
  andersonDarling,
  andersonDarlingPValue,
  capabilityStudy,
  cpConfidenceInterval,
  cpmConfidenceInterval,
  effectiveDegreesOfFreedom,
} from '../../../src/lib/domain/spc/capability.ts';
import { chartConstants } from '../../../src/lib/domain/spc/constants.ts';
import { cusumSeries } from '../../../src/lib/domain/spc/cusum.ts';
import { chiSquareCdf, chiSquareQuantile, mean, normalQuantile, sampleSd } from '../../../src/lib/domain/spc/math.ts';
import { normalSource } from '../support/random.ts';

describe('Anderson–Darling p-value for large A*² (review W1)', () => {
  it('5000 thicknesses from N(2.0, 0.06) µm read to 0.1 µm are not normal (review: A² ≈ 479, correct p ≈ 0)', () => {
    const z = normalSource(42);
    const xs = Array.from({ length: 5000 }, () => Math.round((2 + 0.06 * z()) * 10) / 10);
    const ad = andersonDarling(xs);
    expect(ad?.a2).toBeGreaterThan(300);
    expect(ad?.pValue).toBeLessThan(1e-10);
    expect(ad?.normalAt5Percent).toBe(false);
  });
  it('6000 values alternating 0 and 1 (review: A² 1077.7): p = 0', () => {
    const ad = andersonDarling(Array.from({ length: 6000 }, (_, i) => i % 2));
    expect(ad?.a2).toBeCloseTo(1077.7, 0);
    expect(ad?.pValue).toBe(0);
  });
  it('20 000 exponential quantiles (review: A² 929.4, SciPy rejects at every level): p = 0', () => {
    const n = 20_000;
    const ad = andersonDarling(Array.from({ length: n }, (_, i) => -Math.log(1 - (i + 0.5) / n)));
    expect(ad?.a2).toBeCloseTo(929.4, 0);
    expect(ad?.normalAt5Percent).toBe(false);
  });
  it('property: the p-value never rises as A*² grows (a p-value is monotone in its statistic)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 5000, noNaN: true }), fc.double({ min: 0, max: 5000, noNaN: true }), (a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        return andersonDarlingPValue(hi) <= andersonDarlingPValue(lo) + 1e-15;
      }),
    );
  });
});

describe('χ² quantile for tiny p (review, minor point)', () => {
  it.each([1e-6, 1e-9, 1e-12])('df 1, p %f: closed form 2·(erf⁻¹ p)² ≈ πp²/2 and jstat chisquare.inv', (p) => {
    const closed = (Math.PI * p * p) / 2; // erf⁻¹(p) = (√π/2)(p + πp³/12 + …); the p³ term is below 1e-12 relative here
    expect(Math.abs(chiSquareQuantile(p, 1) / closed - 1)).toBeLessThan(1e-9);
    if (p === 1e-6) expect(Math.abs(chiSquareQuantile(p, 1) / jStat.chisquare.inv(p, 1) - 1)).toBeLessThan(1e-9);
  });
  it.each([1e-6, 1e-10])('df 2, p %f: exact −2·ln(1 − p) (χ²₂ is exponential with mean 2)', (p) => {
    expect(Math.abs(chiSquareQuantile(p, 2) / (-2 * Math.log1p(-p)) - 1)).toBeLessThan(1e-9);
  });
  it('property: agrees with jstat 1.9.6 chisquare.inv for df 1…200, p 1e-4…1 − 1e-4', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 200 }), fc.double({ min: 1e-4, max: 1 - 1e-4, noNaN: true }), (df, p) => {
        const ours = chiSquareQuantile(p, df);
        return Math.abs(ours / jStat.chisquare.inv(p, df) - 1) < 1e-7 && Math.abs(chiSquareCdf(ours, df) - p) < 1e-10;
      }),
    );
  });
});

describe('CUSUM new-mean estimate with a FIR head start (review W4)', () => {
  it('μ0 10, σ 1, k 0.5, h 5, HS 2.5, x₁ 13.1: signals at 1 with μ̂ = 13.1, the only observation (review W4)', () => {
    const [p] = cusumSeries([13.1], { center: 10, K: 0.5, H: 5, headStart: 2.5 });
    expect(p?.upper).toBe(true);
    expect(p?.shiftEstimate).toBeCloseTo(13.1, 12);
  });
  it('lower side: x₁ 6.9 → μ̂ = 6.9', () => {
    const [p] = cusumSeries([6.9], { center: 10, K: 0.5, H: 5, headStart: 2.5 });
    expect(p?.lower).toBe(true);
    expect(p?.shiftEstimate).toBeCloseTo(6.9, 12);
  });
  it('property: μ̂ on a signal is the mean of the run’s observations, with or without a head start (Montgomery §9.1.2)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 8, max: 14, noNaN: true }), { minLength: 1, maxLength: 30 }),
        fc.constantFrom(0, 1, 2.5),
        (xs, hs) => {
          const pts = cusumSeries(xs, { center: 10, K: 0.5, H: 5, headStart: hs });
          let runStart = 0;
          for (let i = 0; i < pts.length; i += 1) {
            const p = pts[i]!;
            if (p.cPlus === 0) runStart = i + 1;
            if (p.upper && !p.lower) {
              const run = xs.slice(runStart, i + 1);
              if (Math.abs((p.shiftEstimate ?? Number.NaN) - mean(run)) > 1e-9) return false;
            }
          }
          return true;
        },
      ),
    );
  });
});

/** Relative variance of an estimator by simulation → ν = 1/(2·CV²). */
function simulatedDf(reps: number, seed: number, estimate: (z: () => number) => number): number {
  const z = normalSource(seed);
  const xs = Array.from({ length: reps }, () => estimate(z));
  const m = mean(xs);
  const cv = sampleSd(xs) / m;
  return 1 / (2 * cv * cv);
}

describe('effective degrees of freedom of σ estimates (review U4), against Monte-Carlo simulation', () => {
  it('R̄/d2, 25 subgroups of 5: ν ≈ 90 (review: “df ≈ 90, roughly the equivalent for R̄”); simulation within 5 %', () => {
    const nu = effectiveDegreesOfFreedom({ method: 'rbar', subgroups: 25, size: 5 });
    expect(nu).toBeGreaterThan(88);
    expect(nu).toBeLessThan(92);
    const sim = simulatedDf(6000, 7, (z) => {
      let sum = 0;
      for (let k = 0; k < 25; k += 1) {
        let lo = Infinity;
        let hi = -Infinity;
        for (let j = 0; j < 5; j += 1) {
          const x = z();
          lo = Math.min(lo, x);
          hi = Math.max(hi, x);
        }
        sum += hi - lo;
      }
      return sum / 25 / chartConstants(5).d2;
    });
    expect(Math.abs(nu / sim - 1)).toBeLessThan(0.05);
  });
  it('S̄/c4, 20 subgroups of 4: simulation within 5 %', () => {
    const nu = effectiveDegreesOfFreedom({ method: 'sbar', subgroups: 20, size: 4 });
    const sim = simulatedDf(6000, 11, (z) => {
      let sum = 0;
      for (let k = 0; k < 20; k += 1) sum += sampleSd([z(), z(), z(), z()]);
      return sum / 20 / chartConstants(4).c4;
    });
    expect(Math.abs(nu / sim - 1)).toBeLessThan(0.05);
  });
  it('MR̄/d2, 100 individuals: ν ≈ 0.6·(m − 1), simulation within 5 %', () => {
    const nu = effectiveDegreesOfFreedom({ method: 'mrbar', observations: 100 });
    expect(nu / 99).toBeGreaterThan(0.58);
    expect(nu / 99).toBeLessThan(0.63);
    const sim = simulatedDf(6000, 13, (z) => {
      let prev = z();
      let sum = 0;
      for (let i = 1; i < 100; i += 1) {
        const x = z();
        sum += Math.abs(x - prev);
        prev = x;
      }
      return sum / 99 / chartConstants(2).d2;
    });
    expect(Math.abs(nu / sim - 1)).toBeLessThan(0.05);
  });
  it('Cp 1.19 with ν 90 → 95 % 1.016–1.363, with ν 124 → 1.042–1.338 (review U4, SciPy χ² quantiles)', () => {
    const narrow = cpConfidenceInterval(1.19, 125, 0.95);
    expect(narrow?.lower).toBeCloseTo(1.042, 3);
    expect(narrow?.upper).toBeCloseTo(1.338, 3);
    const wide = cpConfidenceInterval(1.19, 125, 0.95, 90);
    expect(wide?.lower).toBeCloseTo(1.016, 3);
    expect(wide?.upper).toBeCloseTo(1.363, 3);
  });
  it('capabilityStudy uses the basis it is given and reports it', () => {
    const z = normalSource(3);
    const xs = Array.from({ length: 125 }, () => 1.5 + 0.14 * z());
    const byS = capabilityStudy(xs, 0.14, { lsl: 1, usl: 2 });
    const byR = capabilityStudy(xs, 0.14, { lsl: 1, usl: 2 }, { sigmaBasis: { method: 'rbar', subgroups: 25, size: 5 } });
    expect(byS.sigmaBasis?.degreesOfFreedom).toBe(124);
    expect(byR.sigmaBasis?.method).toBe('rbar');
    expect(byR.cpInterval!.upper - byR.cpInterval!.lower).toBeGreaterThan(byS.cpInterval!.upper - byS.cpInterval!.lower);
  });
});

describe('Cpm confidence interval (Chan, Cheng & Spiring 1988; Boyles 1991)', () => {
  it('on target (δ = 0) ν = n, so the interval equals the χ² Cp interval with n degrees of freedom', () => {
    const i = cpmConfidenceInterval(1.2, 40, 10, 1, 10, 0.95)!;
    expect(i.lower).toBeCloseTo(1.2 * Math.sqrt(jStat.chisquare.inv(0.025, 40) / 40), 9);
    expect(i.upper).toBeCloseTo(1.2 * Math.sqrt(jStat.chisquare.inv(0.975, 40) / 40), 9);
  });
  it('Monte-Carlo coverage of the 95 % interval, n 50, mean 0.5σ off target: 93–97 % of 2000 samples', () => {
    const z = normalSource(99);
    const lsl = -3;
    const usl = 3;
    const target = 0;
    const mu = 0.5;
    const trueCpm = (usl - lsl) / (6 * Math.sqrt(1 + (mu - target) ** 2));
    let covered = 0;
    const reps = 2000;
    for (let r = 0; r < reps; r += 1) {
      const xs = Array.from({ length: 50 }, () => mu + z());
      const cap = capabilityStudy(xs, 1, { lsl, usl, target });
      const i = cap.cpmInterval!;
      if (i.lower <= trueCpm && trueCpm <= i.upper) covered += 1;
    }
    expect(covered / reps).toBeGreaterThan(0.93);
    expect(covered / reps).toBeLessThan(0.97);
  });
});

describe('normal quantile against jstat (property)', () => {
  it('Φ⁻¹(p) agrees with jstat normal.inv to 1e-9 for p in (1e-8, 1 − 1e-8)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-8, max: 1 - 1e-8, noNaN: true }), (p) => {
        return Math.abs(normalQuantile(p) - jStat.normal.inv(p, 0, 1)) < 1e-7 * Math.max(1, Math.abs(normalQuantile(p)));
      }),
    );
  });
});
