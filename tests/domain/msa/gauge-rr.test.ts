/**
 * Gauge R&R, bias and linearity against the worked examples of AIAG, Measurement Systems Analysis
 * reference manual, 4th ed. (2010) — the GRR data of 10 parts × 3 appraisers × 3 trials and its
 * average-and-range results as reprinted in W. McNeese, "Three Ways to Analyze a Gage R&R Study"
 * (BPI Consulting, 2015), the bias data of Table III-B 1 (reference 6.00) and the linearity data
 * (5 references × 12 readings, also ISO 22514-7 Table 7 after ISO 11095) — plus a second method
 * (ANOVA against average-and-range), simple-statistics for the regression, closed forms for the
 * t and F distributions, and a simulation with known variance components.
 */
import { describe, expect, it } from 'vitest';
import { linearRegression, rSquared, sampleStandardDeviation, mean as ssMean } from 'simple-statistics';
import { fSurvival, tCdf, tQuantile } from '../../../src/lib/domain/msa/distributions.ts';
import { gaugeAnovaTable, gaugeRrAnova, gaugeRrAverageRange, gaugeVerdict } from '../../../src/lib/domain/msa/gauge-rr.ts';
import { gaugeBias, gaugeLinearity } from '../../../src/lib/domain/msa/bias-linearity.ts';

// AIAG MSA 4th ed. GRR example: rows are trials 1–3 of each appraiser, columns parts 1–10.
const AIAG_ROWS: Record<'A' | 'B' | 'C', number[][]> = {
  A: [
    [0.29, -0.56, 1.34, 0.47, -0.8, 0.02, 0.59, -0.31, 2.26, -1.36],
    [0.41, -0.68, 1.17, 0.5, -0.92, -0.11, 0.75, -0.2, 1.99, -1.25],
    [0.64, -0.58, 1.27, 0.64, -0.84, -0.21, 0.66, -0.17, 2.01, -1.31],
  ],
  B: [
    [0.08, -0.47, 1.19, 0.01, -0.56, -0.2, 0.47, -0.63, 1.8, -1.68],
    [0.25, -1.22, 0.94, 1.03, -1.2, 0.22, 0.55, 0.08, 2.12, -1.62],
    [0.07, -0.68, 1.34, 0.2, -1.28, 0.06, 0.83, -0.34, 2.19, -1.5],
  ],
  C: [
    [0.04, -1.38, 0.88, 0.14, -1.46, -0.29, 0.02, -0.46, 1.77, -1.49],
    [-0.11, -1.13, 1.09, 0.2, -1.07, -0.67, 0.01, -0.56, 1.45, -1.77],
    [-0.15, -0.96, 0.67, 0.11, -1.45, -0.49, 0.21, -0.49, 1.87, -2.16],
  ],
};
/** values[appraiser][part][trial] */
const AIAG = (['A', 'B', 'C'] as const).map((k) => Array.from({ length: 10 }, (_, j) => AIAG_ROWS[k].map((trial) => trial[j]!)));

describe('t and F distributions (closed forms)', () => {
  it('t with 1 df is Cauchy: F(t) = ½ + atan(t)/π', () => {
    for (const t of [-3, -0.5, 0.2, 1, 4]) expect(tCdf(t, 1)).toBeCloseTo(0.5 + Math.atan(t) / Math.PI, 12);
  });
  it('t with 2 df: F(t) = ½ + t/(2√(2 + t²))', () => {
    for (const t of [-2, 0.7, 3]) expect(tCdf(t, 2)).toBeCloseTo(0.5 + t / (2 * Math.sqrt(2 + t * t)), 12);
  });
  it('t quantiles as printed in the usual t table (two-sided 95 %): 12.706 (1), 2.262 (9), 2.145 (14), 2.002 (58)', () => {
    expect(tQuantile(0.975, 1)).toBeCloseTo(12.706, 3);
    expect(tQuantile(0.975, 9)).toBeCloseTo(2.262, 3);
    expect(tQuantile(0.975, 14)).toBeCloseTo(2.145, 3);
    expect(tQuantile(0.975, 58)).toBeCloseTo(2.002, 3);
  });
  it('F with d1 = 2: P(F > f) = (1 + 2f/d2)^(−d2/2)', () => {
    for (const [f, d2] of [
      [0.5, 5],
      [3, 10],
      [7, 60],
    ] as const)
      expect(fSurvival(f, 2, d2)).toBeCloseTo((1 + (2 * f) / d2) ** (-d2 / 2), 12);
  });
});

describe('GRR by average and range — AIAG MSA 4th ed. example (McNeese 2015 reprint)', () => {
  const r = gaugeRrAverageRange(AIAG);
  it('R̄̄ = 0.3417, X̄diff = 0.4447, Rp = 3.511 as printed', () => {
    expect(r.rBarBar).toBeCloseTo(0.3417, 4);
    expect(r.xDiff).toBeCloseTo(0.4447, 4);
    expect(r.rangeOfParts).toBeCloseTo(3.511, 3);
  });
  it('EV 0.20188, AV 0.22963, GRR 0.30575, PV 1.10456, TV 1.14610 (σ, as printed)', () => {
    expect(r.repeatability.sd).toBeCloseTo(0.20188, 4);
    expect(r.reproducibility.sd).toBeCloseTo(0.22963, 4);
    expect(r.grr.sd).toBeCloseTo(0.30575, 4);
    expect(r.partVariation.sd).toBeCloseTo(1.10456, 4);
    expect(r.totalVariation.sd).toBeCloseTo(1.1461, 4);
  });
  it('%EV 17.6, %AV 20.0, %GRR 26.7, %PV 96.4, ndc 5 as printed → conditional', () => {
    expect(r.repeatability.pctTotalVariation).toBeCloseTo(17.6, 1);
    expect(r.reproducibility.pctTotalVariation).toBeCloseTo(20.0, 1);
    expect(r.grr.pctTotalVariation).toBeCloseTo(26.7, 1);
    expect(r.partVariation.pctTotalVariation).toBeCloseTo(96.4, 1);
    expect(r.ndc).toBe(5);
    expect(r.verdict).toBe('conditional');
  });
  it('UCL_R = D4·R̄̄ = 2.574 × 0.3417; only appraiser B on part 4 (1.03 − 0.01 = 1.02) exceeds it', () => {
    expect(r.rangeLimit).toBeCloseTo(0.8795, 3);
    expect(r.rangesOutOfControl).toEqual([{ appraiser: 2, part: 4, range: expect.closeTo(1.02, 10) }]);
  });
  it('%GRR of tolerance = 6σ_GRR/tolerance: a tolerance of 6·0.30575/0.08 gives 8 %', () => {
    const t = gaugeRrAverageRange(AIAG, { tolerance: (6 * 0.305748) / 0.08 });
    expect(t.grr.pctTolerance).toBeCloseTo(8, 2);
  });
});

describe('GRR by ANOVA — same AIAG data (variance components as McNeese 2015 prints them)', () => {
  const r = gaugeRrAnova(AIAG);
  const table = gaugeAnovaTable(AIAG);
  const row = (s: string) => table.rows.find((x) => x.source === s)!;
  it('SS part 88.362, appraiser 3.167, interaction 0.359, repeatability 2.759; they sum to the total', () => {
    expect(row('part').ss).toBeCloseTo(88.362, 2);
    expect(row('appraiser').ss).toBeCloseTo(3.167, 2);
    expect(row('interaction').ss).toBeCloseTo(0.359, 2);
    expect(row('repeatability').ss).toBeCloseTo(2.759, 2);
    const sum = ['part', 'appraiser', 'interaction', 'repeatability'].reduce((s, k) => s + row(k).ss, 0);
    expect(sum).toBeCloseTo(row('total').ss, 10);
  });
  it('interaction not significant (F = 0.434) → pooled', () => {
    expect(row('interaction').f).toBeCloseTo(0.01994 / 0.04598, 2);
    expect(table.interactionPooled).toBe(true);
  });
  it('σ² repeatability 0.0400, reproducibility 0.0515, GRR 0.0914, part 1.086, total 1.177', () => {
    expect(r.repeatability.variance).toBeCloseTo(0.04, 4);
    expect(r.reproducibility.variance).toBeCloseTo(0.0515, 4);
    expect(r.grr.variance).toBeCloseTo(0.0914, 4);
    expect(r.partVariation.variance).toBeCloseTo(1.086, 3);
    expect(r.totalVariation.variance).toBeCloseTo(1.1774, 2);
    expect(r.totalVariation.variance).toBeCloseTo(r.grr.variance + r.partVariation.variance, 12);
  });
  it('ndc = ⌊1.41·√1.0864/√0.0915⌋ = 4 → unacceptable although %GRR is 27.9 %', () => {
    expect(r.grr.pctTotalVariation).toBeCloseTo(27.9, 1);
    expect(r.ndc).toBe(4);
    expect(r.verdict).toBe('unacceptable');
  });
  it('second method: ANOVA and average-and-range agree within 10 % on σ_GRR and σ_PV', () => {
    const ar = gaugeRrAverageRange(AIAG);
    expect(Math.abs(r.grr.sd / ar.grr.sd - 1)).toBeLessThan(0.1);
    expect(Math.abs(r.partVariation.sd / ar.partVariation.sd - 1)).toBeLessThan(0.1);
  });
});

/** mulberry32: a small deterministic generator, and Box–Muller normals. */
function rng(seed: number) {
  let s = seed >>> 0;
  const u = () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
}

describe('simulation with known variance components (σ_P 1, σ_A 0.3, σ_AP 0.2, σ_e 0.25)', () => {
  // Average over 400 simulated 10 × 3 × 3 studies: the ANOVA estimators are unbiased for the
  // variances before truncation at zero, so their means recover the true components.
  const z = rng(20261204);
  const studies = 400;
  const acc = { e: 0, a: 0, ap: 0, p: 0, grrAr: 0 };
  for (let s = 0; s < studies; s += 1) {
    const part = Array.from({ length: 10 }, () => 1 * z());
    const appr = Array.from({ length: 3 }, () => 0.3 * z());
    const data = appr.map((ai) =>
      part.map((pj) => {
        const ap = 0.2 * z();
        return Array.from({ length: 3 }, () => 5 + pj + ai + ap + 0.25 * z());
      }),
    );
    const r = gaugeRrAnova(data, { poolingP: 1.01 }); // never pool: estimate every component
    acc.e += r.repeatability.variance;
    acc.a += r.reproducibility.variance - (r.interaction?.variance ?? 0);
    acc.ap += r.interaction?.variance ?? 0;
    acc.p += r.partVariation.variance;
    acc.grrAr += gaugeRrAverageRange(data).repeatability.variance;
  }
  it('repeatability σ² 0.0625 within 5 %, both methods', () => {
    expect(acc.e / studies).toBeGreaterThan(0.0625 * 0.95);
    expect(acc.e / studies).toBeLessThan(0.0625 * 1.05);
    expect(acc.grrAr / studies).toBeGreaterThan(0.0625 * 0.9);
    expect(acc.grrAr / studies).toBeLessThan(0.0625 * 1.1);
  });
  it('interaction σ² 0.04 and part σ² 1 within 15 %; appraiser σ² 0.09 within 35 % (3 appraisers: few df)', () => {
    expect(Math.abs(acc.ap / studies / 0.04 - 1)).toBeLessThan(0.15);
    expect(Math.abs(acc.p / studies / 1 - 1)).toBeLessThan(0.15);
    expect(Math.abs(acc.a / studies / 0.09 - 1)).toBeLessThan(0.35);
  });
});

describe('verdict bands (AIAG MSA 4th ed.: < 10 % acceptable, 10–30 % conditional, > 30 % unacceptable, ndc ≥ 5)', () => {
  it.each([
    [9.9, null, 14, 'acceptable'],
    [10, null, 14, 'conditional'],
    [30, null, 6, 'conditional'],
    [30.1, null, 6, 'unacceptable'],
    [5, 35, 20, 'unacceptable'],
    [5, null, 4, 'unacceptable'],
  ] as const)('%GRR TV %f, tolerance %s, ndc %i → %s', (tv, tol, ndc, verdict) => {
    expect(gaugeVerdict(tv, tol, ndc).verdict).toBe(verdict);
  });
  it('refuses an unbalanced study and one without variation', () => {
    expect(() => gaugeRrAnova([[[1, 2]], [[1]]])).toThrow(RangeError);
    expect(() =>
      gaugeRrAnova([
        [
          [1, 1],
          [2, 2],
        ],
        [
          [1, 1],
          [2, 2],
        ],
      ]),
    ).toThrow(/resolution/);
    expect(() => gaugeRrAverageRange(AIAG.map((a) => a.map((c) => [...c, c[0]!])))).toThrow(/2 or 3 trials/);
  });
});

const BIAS = [5.8, 5.7, 5.9, 5.9, 6.0, 6.1, 6.0, 6.1, 6.4, 6.3, 6.0, 6.1, 6.2, 5.6, 6.0]; // AIAG Table III-B 1, ref 6.00

describe('bias — AIAG MSA 4th ed. Table III-B 1 (15 readings of a 6.00 reference)', () => {
  const b = gaugeBias(BIAS, 6);
  it('mean and σ_r agree with simple-statistics; bias 0.0067 as printed', () => {
    expect(b.mean).toBeCloseTo(ssMean(BIAS), 12);
    expect(b.sdRepeatability).toBeCloseTo(sampleStandardDeviation(BIAS), 12);
    expect(b.bias).toBeCloseTo(0.0067, 4);
    expect(b.sdRepeatability).toBeCloseTo(0.212, 3);
  });
  it('t = 0.122 with 14 df; the 95 % interval (−0.1107, 0.1241) contains 0 → acceptable', () => {
    expect(b.t).toBeCloseTo(0.122, 2);
    expect(b.ci[0]).toBeCloseTo(-0.1107, 3);
    expect(b.ci[1]).toBeCloseTo(0.1241, 3);
    expect(b.acceptable).toBe(true);
  });
  it('a shifted gauge (+0.3) is a significant bias', () => {
    expect(
      gaugeBias(
        BIAS.map((x) => x + 0.3),
        6,
      ).acceptable,
    ).toBe(false);
  });
});

const LIN: Record<number, number[]> = {
  2: [2.7, 2.5, 2.4, 2.5, 2.7, 2.3, 2.5, 2.5, 2.4, 2.4, 2.6, 2.4],
  4: [5.1, 3.9, 4.2, 5.0, 3.8, 3.9, 3.9, 3.9, 3.9, 4.0, 4.1, 3.8],
  6: [5.8, 5.7, 5.9, 5.9, 6.0, 6.1, 6.0, 6.1, 6.4, 6.3, 6.0, 6.1],
  8: [7.6, 7.7, 7.8, 7.7, 7.8, 7.8, 7.8, 7.7, 7.8, 7.5, 7.6, 7.7],
  10: [9.1, 9.3, 9.5, 9.3, 9.4, 9.5, 9.5, 9.5, 9.6, 9.2, 9.3, 9.4],
};
const LIN_POINTS = Object.entries(LIN).flatMap(([ref, xs]) => xs.map((reading) => ({ reference: Number(ref), reading })));

describe('linearity — AIAG MSA 4th ed. example (5 references × 12 readings)', () => {
  const l = gaugeLinearity(LIN_POINTS);
  it('slope −0.1317, intercept 0.7367, R² 0.71 as printed; the same line as simple-statistics', () => {
    const pairs = LIN_POINTS.map((p) => [p.reference, p.reading - p.reference]);
    const ls = linearRegression(pairs);
    expect(l.slope).toBeCloseTo(ls.m, 12);
    expect(l.intercept).toBeCloseTo(ls.b, 12);
    expect(l.rSquared).toBeCloseTo(
      rSquared(pairs, (x) => ls.m * x + ls.b),
      12,
    );
    expect(l.slope).toBeCloseTo(-0.1317, 4);
    expect(l.intercept).toBeCloseTo(0.7367, 4);
    expect(l.rSquared).toBeCloseTo(0.71, 2);
  });
  it('average bias at reference 2 is +0.4917 and at 10 is −0.6167 (the manual’s table)', () => {
    expect(l.biasByReference[0]!.averageBias).toBeCloseTo(0.4917, 4);
    expect(l.biasByReference[4]!.averageBias).toBeCloseTo(-0.6167, 4);
  });
  it('slope and intercept both differ from zero (|t| ≫ t(0.975, 58) = 2.002): the gauge has a linearity problem', () => {
    expect(l.df).toBe(58);
    expect(l.linearityAcceptable).toBe(false);
    expect(l.biasAcceptable).toBe(false);
  });
  it('a gauge with only noise has acceptable linearity', () => {
    const flat = LIN_POINTS.map((p, i) => ({ reference: p.reference, reading: p.reference + (i % 2 ? 0.05 : -0.05) }));
    expect(gaugeLinearity(flat).linearityAcceptable).toBe(true);
  });
});
