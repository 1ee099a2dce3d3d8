import { describe, expect, it } from 'vitest';
import { evaluateAgainstLimitSet, evaluateSpc, limitSetFromEvaluation } from '../../../src/lib/domain/spc/evaluate.ts';
import { SpcEvaluateInputSchema, type SpcEvaluateInput } from '../../../src/lib/shared/spc.ts';

const run = (input: SpcEvaluateInput) => evaluateSpc(SpcEvaluateInputSchema.parse(input));
const flagged = (out: ReturnType<typeof evaluateSpc>) => out.points.filter((p) => p.violations.length > 0).map((p) => p.index);

describe('individuals / moving range — NIST/SEMATECH e-Handbook §6.3.2.2 (flow rates)', () => {
  const values = [49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];
  const out = run({ chart: 'imr', values });
  it('x̄ 50.81 and MR̄ 1.8778 (4 dp as printed)', () => {
    expect(out.limits.center).toBeCloseTo(50.81, 4);
    expect(out.dispersion?.center).toBeCloseTo(1.8778, 4);
  });
  it('UCL 55.8041, LCL 45.8159: NIST multiplies MR̄ by 3/1.128 (d2 rounded to 3 dp)', () => {
    // Our d2 is exact (1.128379…), which moves the limits by 0.0017: equal to 2 dp.
    expect(out.limits.ucl).toBeCloseTo(55.8041, 2);
    expect(out.limits.lcl).toBeCloseTo(45.8159, 2);
    // The printed 4-dp values come back exactly with NIST's rounded d2:
    const mrBar = out.dispersion?.center ?? Number.NaN;
    expect(50.81 + (3 / 1.128) * mrBar).toBeCloseTo(55.8041, 4);
    expect(50.81 - (3 / 1.128) * mrBar).toBeCloseTo(45.8159, 4);
  });
  it('all points in control; first moving range is null; MR LCL 0', () => {
    expect(flagged(out)).toEqual([]);
    expect(out.points[0]?.dispersionValue).toBeNull();
    expect(out.points[1]?.dispersionValue).toBeCloseTo(2.0, 10);
    expect(out.dispersion?.lcl).toBe(0);
    expect(out.phase1?.suggestedExclusions).toEqual([]);
  });
});

describe('EWMA — NIST/SEMATECH e-Handbook §6.3.2.4 (target 50, s 2.0539, λ 0.3, L 3)', () => {
  const values = [
    52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1,
  ];
  // Printed EWMA series (2 dp), NIST §6.3.2.4 table.
  const printed = [
    50.6, 49.52, 50.56, 50.18, 50.16, 49.21, 49.75, 49.85, 50.26, 50.33, 50.11, 49.36, 49.52, 50.05, 49.38, 49.92, 50.73, 51.23,
    51.94, 51.99,
  ];
  const out = run({ chart: 'ewma', values, target: 50, sigma: 2.0539, lambda: 0.3, L: 3, limits: 'asymptotic' });
  it.each(printed.map((z, i) => [i + 1, z] as const))('z at point %i = %f', (i, z) => {
    expect(out.points[i - 1]?.value).toBeCloseTo(z, 2);
  });
  it('asymptotic limits UCL 52.5884 (4 dp) / LCL 47.4115', () => {
    expect(out.limits.ucl).toBeCloseTo(52.5884, 4);
    // 50 − 2.58843 = 47.41157: NIST prints 47.4115 (truncated), so compare to 3 dp.
    expect(out.limits.lcl).toBeCloseTo(47.4115, 3);
    expect(out.points.every((p) => p.ucl === out.limits.ucl)).toBe(true);
  });
  it('no EWMA signal; the observation rides along', () => {
    expect(flagged(out)).toEqual([]);
    expect(out.points[0]?.observation).toBe(52.0);
  });
  it('exact limits start narrow and widen towards the asymptotic ones', () => {
    const exact = run({ chart: 'ewma', values, target: 50, sigma: 2.0539, lambda: 0.3, L: 3 });
    // σ_z,1 = σ·λ (first point): UCL₁ = 50 + 3·2.0539·0.3.
    expect(exact.points[0]?.ucl).toBeCloseTo(50 + 3 * 2.0539 * 0.3, 10);
    expect(exact.points[19]?.ucl).toBeCloseTo(52.5884, 3);
  });
});

describe('EWMA and CUSUM — Montgomery, Introduction to SQC, Table 9.1 data (μ0 10, σ 1)', () => {
  // Data as transcribed in several public test suites of Montgomery's Table 9.1.
  const t91 = [
    9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.2, 10.34, 9.03, 11.47, 10.51, 9.4, 10.08, 9.37, 10.62, 10.31, 8.52,
    10.84, 10.9, 9.33, 12.29, 11.5, 10.6, 11.08, 10.38, 11.62, 11.31, 10.52,
  ];
  it('tabular CUSUM k 0.5, h 5: C⁺ as tabulated for periods 1–29 (2 dp), signal at 29 with N⁺ 7 and μ̂ = 11.25', () => {
    // Montgomery Table 9.2 upper sums, periods 1–29.
    const upper = [
      0, 0, 0, 1.16, 2.82, 2.5, 0.04, 1.0, 0, 0, 0, 0.97, 0.98, 0, 0, 0, 0.12, 0, 0, 0.34, 0.74, 0, 1.79, 2.79, 2.89, 3.47, 3.35,
      4.47, 5.28,
    ];
    const out = run({ chart: 'cusum', values: t91, target: 10, sigma: 1, k: 0.5, h: 5 });
    upper.forEach((c, i) => expect(out.points[i]?.cPlus).toBeCloseTo(c, 2));
    expect(flagged(out)[0]).toBe(29);
    expect(out.points[28]?.nPlus).toBe(7);
    // Montgomery §9.1.2: μ̂ = μ0 + K + C⁺/N⁺ = 10 + 0.5 + 5.28/7 = 11.25 (from memory of the text).
    expect(out.points[28]?.shiftEstimate).toBeCloseTo(11.25, 2);
    expect(out.points[27]?.shiftEstimate).toBeNull();
  });
  it('EWMA λ 0.1, L 2.7 with exact limits: z₁ 9.945, z₂ 9.7495; first signal at 29 (Montgomery Example 9.2, from memory)', () => {
    const out = run({ chart: 'ewma', values: t91, target: 10, sigma: 1, lambda: 0.1, L: 2.7 });
    expect(out.points[0]?.value).toBeCloseTo(9.945, 3);
    expect(out.points[1]?.value).toBeCloseTo(9.7495, 4);
    // Exact limits: period 1 → 10.27 / 9.73, period 2 → 10.36 / 9.64; asymptotic 10.62 / 9.38.
    expect(out.points[0]?.ucl).toBeCloseTo(10.27, 2);
    expect(out.points[0]?.lcl).toBeCloseTo(9.73, 2);
    expect(out.points[1]?.ucl).toBeCloseTo(10.36, 2);
    expect(out.limits.ucl).toBeCloseTo(10.62, 2);
    expect(flagged(out)).toEqual([29, 30]);
    expect(out.points[28]?.violations).toEqual(['ewma-upper']);
  });
  it('a FIR head start of h/2 makes an early shift signal sooner (Montgomery §9.1.4)', () => {
    const shifted = [11.2, 11.0, 11.4, 10.9, 11.3, 11.1, 11.2];
    const plain = run({ chart: 'cusum', values: shifted, target: 10, sigma: 1 });
    const fir = run({ chart: 'cusum', values: shifted, target: 10, sigma: 1, headStart: 2.5 });
    expect(flagged(fir)[0]).toBeLessThan(flagged(plain)[0] ?? Number.POSITIVE_INFINITY);
    expect(fir.points[0]?.cPlus).toBeCloseTo(2.5 + 11.2 - 10.5, 10);
  });
});

describe('tabular CUSUM — NIST/SEMATECH e-Handbook §6.3.2.3 (target 325)', () => {
  // NIST gives k = 0.3175 and h = 4.1959 in data units with σ = 0.635 (of the group means);
  // in sigma units k = 0.3175/0.635 = 0.5 and h = 4.1959/0.635 = 6.6077.
  const means = [
    324.925, 324.675, 324.725, 324.35, 325.35, 325.225, 324.125, 324.525, 325.225, 324.6, 324.625, 325.15, 328.325, 327.25,
    327.825, 328.5, 326.675, 327.775, 326.875, 328.35,
  ];
  const out = run({ chart: 'cusum', values: means, target: 325, sigma: 0.635, k: 0.3175 / 0.635, h: 4.1959 / 0.635 });
  it('K and H in data units are 0.3175 and 4.1959', () => {
    expect(out.parameters.K).toBeCloseTo(0.3175, 10);
    expect(out.parameters.H).toBeCloseTo(4.1959, 10);
    expect(out.limits).toEqual({ center: 0, ucl: out.parameters.H, lcl: -(out.parameters.H ?? 0) });
  });
  it('upper sum first exceeds h at group 14 (4.94) and reaches 19.035 at group 20', () => {
    expect(out.points[12]?.cPlus).toBeCloseTo(3.0075, 4);
    expect(out.points[13]?.cPlus).toBeCloseTo(4.94, 2);
    expect(flagged(out)[0]).toBe(14);
    expect(out.points[13]?.violations).toEqual(['cusum-upper']);
    expect(out.points[19]?.cPlus).toBeCloseTo(19.035, 3);
    expect(out.points.every((p, i) => p.value === means[i])).toBe(true);
    expect(out.points.some((p) => p.violations.includes('cusum-lower'))).toBe(false);
  });
});

/**
 * Montgomery, Introduction to SQC, Table 6.1 (numbering of the 6th ed.), flow width (µm) of the
 * hard-bake process, 25 samples of 5 wafers. Transcribed from public copies of the table (the
 * printed x̄ᵢ and Rᵢ columns are kept and checked, and sample 25 x₅ = 1.6887 reproduces ΣR = 8.1302).
 * Sample 23's values are in the order one transcription lists them; order does not affect X̄-R.
 */
const HARD_BAKE: readonly (readonly [number, number, number, number, number, number, number])[] = [
  [1.3235, 1.4128, 1.6744, 1.4573, 1.6914, 1.5119, 0.3679],
  [1.4314, 1.3592, 1.6075, 1.4666, 1.6109, 1.4951, 0.2517],
  [1.4284, 1.4871, 1.4932, 1.4324, 1.5674, 1.4817, 0.139],
  [1.5028, 1.6352, 1.3841, 1.2831, 1.5507, 1.4712, 0.3521],
  [1.5604, 1.2735, 1.5265, 1.4363, 1.6441, 1.4882, 0.3706],
  [1.5955, 1.5451, 1.3574, 1.3281, 1.4198, 1.4492, 0.2674],
  [1.6274, 1.5064, 1.8366, 1.4177, 1.5144, 1.5805, 0.4189],
  [1.419, 1.4303, 1.6637, 1.6067, 1.5519, 1.5343, 0.2447],
  [1.3884, 1.7277, 1.5355, 1.5176, 1.3688, 1.5076, 0.3589],
  [1.4039, 1.6697, 1.5089, 1.4627, 1.522, 1.5134, 0.2658],
  [1.4158, 1.7667, 1.4278, 1.5928, 1.4181, 1.5242, 0.3509],
  [1.5821, 1.3355, 1.5777, 1.3908, 1.7559, 1.5284, 0.4204],
  [1.2856, 1.4106, 1.4447, 1.6398, 1.1928, 1.3947, 0.447],
  [1.4951, 1.4036, 1.5893, 1.6458, 1.4969, 1.5261, 0.2422],
  [1.3589, 1.2863, 1.5996, 1.2497, 1.5471, 1.4083, 0.3499],
  [1.5747, 1.5301, 1.5171, 1.1839, 1.8662, 1.5344, 0.6823],
  [1.368, 1.7269, 1.3957, 1.5014, 1.4449, 1.4874, 0.3589],
  [1.4163, 1.3864, 1.3057, 1.621, 1.5573, 1.4573, 0.3153],
  [1.5796, 1.4185, 1.6541, 1.5116, 1.7247, 1.5777, 0.3062],
  [1.7106, 1.4412, 1.2361, 1.382, 1.7601, 1.506, 0.524],
  [1.4371, 1.5051, 1.3485, 1.567, 1.488, 1.4691, 0.2185],
  [1.4738, 1.5936, 1.6583, 1.4973, 1.472, 1.539, 0.1863],
  [1.5917, 1.5551, 1.4333, 1.5295, 1.6866, 1.5592, 0.2533],
  [1.6399, 1.5243, 1.5705, 1.5563, 1.553, 1.5688, 0.1156],
  [1.5797, 1.3663, 1.624, 1.3732, 1.6887, 1.5264, 0.3224],
];

describe('X̄-R — Montgomery hard-bake flow width (Table 6.1), spec 1.50 ± 0.50 µm', () => {
  const subgroups = HARD_BAKE.map((r) => r.slice(0, 5));
  const out = run({ chart: 'xbar-r', subgroups, spec: { lsl: 1.0, usl: 2.0 } });
  it('per-sample x̄ᵢ and Rᵢ match the printed columns (4 dp)', () => {
    HARD_BAKE.forEach((r, i) => {
      expect(out.points[i]?.value).toBeCloseTo(r[5], 4);
      expect(out.points[i]?.dispersionValue).toBeCloseTo(r[6], 4);
    });
  });
  it('x̿ 1.5056, R̄ 0.32521, UCL 1.6932, LCL 1.3180 (4 dp)', () => {
    expect(out.limits.center).toBeCloseTo(1.5056, 4);
    expect(out.dispersion?.center).toBeCloseTo(0.32521, 5);
    expect(out.limits.ucl).toBeCloseTo(1.6932, 4);
    expect(out.limits.lcl).toBeCloseTo(1.318, 4);
  });
  it('R chart UCL 0.68749 (the book uses the table D4 = 2.114; the exact D4 = 2.1145 agrees to 3 dp), LCL 0', () => {
    expect(out.dispersion?.ucl).toBeCloseTo(0.68749, 3);
    expect(out.dispersion?.lcl).toBe(0);
  });
  it('in control: no violations and no suggested exclusions', () => {
    expect(flagged(out)).toEqual([]);
    expect(out.phase1?.suggestedExclusions).toEqual([]);
  });
  it('σ̂ = R̄/d2 = 0.1398 and Cp ≈ 1.19 (Montgomery §8.3)', () => {
    expect(out.sigmaWithin).toBeCloseTo(0.1398, 4);
    expect(out.capability?.cp).toBeCloseTo(1.19, 2);
  });
});

// Montgomery, Introduction to SQC, piston-ring inside diameter (mm): 25 phase-1 samples of 5 and 15
// phase-2 samples; data as distributed with the R package qcc (data/pistonrings.txt).
const RINGS_RAW =
  '74.030 74.002 74.019 73.992 74.008 73.995 73.992 74.001 74.011 74.004 73.988 74.024 74.021 74.005 74.002 74.002 73.996 73.993 74.015 74.009 73.992 74.007 74.015 73.989 74.014 74.009 73.994 73.997 73.985 73.993 73.995 74.006 73.994 74.000 74.005 73.985 74.003 73.993 74.015 73.988 74.008 73.995 74.009 74.005 74.004 73.998 74.000 73.990 74.007 73.995 73.994 73.998 73.994 73.995 73.990 74.004 74.000 74.007 74.000 73.996 73.983 74.002 73.998 73.997 74.012 74.006 73.967 73.994 74.000 73.984 74.012 74.014 73.998 73.999 74.007 74.000 73.984 74.005 73.998 73.996 73.994 74.012 73.986 74.005 74.007 74.006 74.010 74.018 74.003 74.000 73.984 74.002 74.003 74.005 73.997 74.000 74.010 74.013 74.020 74.003 73.988 74.001 74.009 74.005 73.996 74.004 73.999 73.990 74.006 74.009 74.010 73.989 73.990 74.009 74.014 74.015 74.008 73.993 74.000 74.010 73.982 73.984 73.995 74.017 74.013 74.012 74.015 74.030 73.986 74.000 73.995 74.010 73.990 74.015 74.001 73.987 73.999 73.985 74.000 73.990 74.008 74.010 74.003 73.991 74.006 74.003 74.000 74.001 73.986 73.997 73.994 74.003 74.015 74.020 74.004 74.008 74.002 74.018 73.995 74.005 74.001 74.004 73.990 73.996 73.998 74.015 74.000 74.016 74.025 74.000 74.030 74.005 74.000 74.016 74.012 74.001 73.990 73.995 74.010 74.024 74.015 74.020 74.024 74.005 74.019 74.035 74.010 74.012 74.015 74.026 74.017 74.013 74.036 74.025 74.026 74.010 74.005 74.029 74.000 74.020'
    .split(' ')
    .map(Number);
const RINGS = Array.from({ length: 40 }, (_, i) => RINGS_RAW.slice(5 * i, 5 * i + 5));

describe('X̄-S and X̄-R — Montgomery piston-ring inside diameter (Examples 6.1 and 6.3)', () => {
  it('X̄-S: x̿ 74.001, UCL 74.014, LCL 73.988 (3 dp, from memory of the text), S chart LCL 0', () => {
    const out = run({ chart: 'xbar-s', subgroups: RINGS, phase1: { first: 1, last: 25 } });
    expect(out.limits.center).toBeCloseTo(74.001, 3);
    expect(out.limits.ucl).toBeCloseTo(74.014, 3);
    expect(out.limits.lcl).toBeCloseTo(73.988, 3);
    expect(out.dispersion?.lcl).toBe(0);
    // s̄ from these data is 0.00924 and B4·s̄ = 0.0193. My recollection of the book's s̄ = 0.0094 and
    // S-chart UCL = 0.0196 is NOT reproduced by the transcribed data, so only the computed values are pinned.
    expect(out.dispersion?.center).toBeCloseTo(0.00924, 5);
    expect(out.dispersion?.ucl).toBeCloseTo(2.089 * 0.00924, 4);
  });
  it('X̄-R: R̄ 0.023, UCL 74.014, LCL 73.988; R UCL 0.049 is 2.114 × the rounded R̄ 0.023 (2 dp here)', () => {
    const out = run({ chart: 'xbar-r', subgroups: RINGS, phase1: { first: 1, last: 25 } });
    expect(out.dispersion?.center).toBeCloseTo(0.023, 3);
    expect(out.limits.ucl).toBeCloseTo(74.014, 3);
    expect(out.limits.lcl).toBeCloseTo(73.988, 3);
    expect(out.dispersion?.ucl).toBeCloseTo(0.049, 2);
  });
  it('phase II: samples 26–40 judged against the phase-1 limits; 37, 38 and 39 are above the UCL', () => {
    const out = run({ chart: 'xbar-r', subgroups: RINGS, phase1: { first: 1, last: 25 }, rules: ['we1'] });
    expect(flagged(out)).toEqual([37, 38, 39]);
    expect(out.points[36]?.inPhase1).toBe(false);
    expect(out.phase1?.suggestedExclusions).toEqual([]);
  });
  it('an approved limit set gives the same verdicts on new data without re-estimating', () => {
    const phase1 = run({ chart: 'xbar-r', subgroups: RINGS.slice(0, 25) });
    const approved = limitSetFromEvaluation(phase1);
    const phase2 = evaluateAgainstLimitSet({ subgroups: RINGS.slice(25) }, approved, { rules: ['we1'] });
    expect(phase2.phase1).toBeNull();
    expect(phase2.limits).toEqual(phase1.limits);
    expect(flagged(phase2)).toEqual([12, 13, 14]);
  });
  it('standards given (μ 74, σ 0.01): limits μ ± 3σ/√5 and R limits D1σ, d2σ, D2σ', () => {
    const out = run({ chart: 'xbar-r', subgroups: RINGS.slice(0, 25), target: 74, sigma: 0.01 });
    expect(out.limits.ucl).toBeCloseTo(74 + (3 * 0.01) / Math.sqrt(5), 12);
    expect(out.dispersion?.center).toBeCloseTo(0.02326, 5);
    expect(out.dispersion?.ucl).toBeCloseTo(0.04918, 5);
    expect(out.parameters.centerSource).toBe('given');
    expect(out.phase1?.suggestedExclusions).toEqual([]);
  });
});

describe('p and np charts — Montgomery orange-juice cans (Example 7.1) = NIST/SEMATECH §6.3.3.2 wafer data', () => {
  // 30 samples of n = 50; data as distributed with the R package qcc (data/orangejuice.txt).
  const D = [12, 15, 8, 10, 4, 7, 16, 9, 14, 10, 5, 6, 17, 12, 22, 8, 10, 5, 13, 11, 20, 18, 24, 15, 9, 12, 7, 13, 9, 6];
  const sizes = D.map(() => 50);
  const out = run({ chart: 'p', counts: D, sizes });
  it('p̄ 0.2313, UCL 0.4102, LCL 0.0524 (4 dp)', () => {
    expect(out.limits.center).toBeCloseTo(0.2313, 4);
    expect(out.limits.ucl).toBeCloseTo(0.4102, 4);
    expect(out.limits.lcl).toBeCloseTo(0.0524, 4);
    expect(out.sigmaWithin).toBeNull();
  });
  it('samples 15 and 23 are out of control', () => {
    expect(flagged(out)).toEqual([15, 23]);
  });
  it('suggested exclusions: 15 and 23 first; the revised limits (p̄ 0.2150, UCL 0.3893) then catch sample 21', () => {
    expect(out.phase1?.suggestedExclusions.map((s) => [s.index, s.iteration])).toEqual([
      [15, 1],
      [23, 1],
      [21, 2],
    ]);
    const revised = run({ chart: 'p', counts: D.filter((_, i) => i !== 14 && i !== 22), sizes: sizes.slice(2) });
    expect(revised.limits.center).toBeCloseTo(0.215, 4);
    expect(revised.limits.ucl).toBeCloseTo(0.3893, 4);
    expect(revised.limits.lcl).toBeCloseTo(0.0407, 4);
  });
  it('np chart: centre n·p̄ = 11.57, limits 20.51 / 2.62', () => {
    const np = run({ chart: 'np', counts: D, sizes });
    expect(np.limits.center).toBeCloseTo(11.5667, 4);
    expect(np.limits.ucl).toBeCloseTo(50 * 0.41024, 2);
    expect(np.limits.lcl).toBeCloseTo(50 * 0.05243, 2);
    expect(flagged(np)).toEqual([15, 23]);
  });
  it('varying sample sizes give per-point limits p̄ ± 3√(p̄(1−p̄)/nᵢ)', () => {
    const counts = [5, 8, 3, 10];
    const ns = [100, 200, 50, 150];
    const v = run({ chart: 'p', counts, sizes: ns });
    const pbar = 26 / 500;
    ns.forEach((n, i) => {
      expect(v.points[i]?.ucl).toBeCloseTo(pbar + 3 * Math.sqrt((pbar * (1 - pbar)) / n), 12);
      expect(v.points[i]?.lcl).toBe(Math.max(0, pbar - 3 * Math.sqrt((pbar * (1 - pbar)) / n)));
    });
    expect(v.notes.join(' ')).toMatch(/mean sample size 125/);
  });
});

describe('c chart — Montgomery printed-circuit boards (Example 7.3), 26 samples of 100 boards', () => {
  // Data as distributed with the R package qcc (data/circuit.txt, trial samples).
  const counts = [21, 24, 16, 12, 15, 5, 28, 20, 31, 25, 20, 24, 16, 19, 10, 17, 13, 22, 18, 39, 30, 24, 16, 19, 17, 15];
  const out = run({ chart: 'c', counts });
  it('c̄ 19.85, UCL 33.22, LCL 6.48 (2 dp); samples 6 and 20 out', () => {
    expect(out.limits.center).toBeCloseTo(19.85, 2);
    // The book rounds c̄ to 19.85 first: 19.85 + 3√19.85 = 33.22; with the exact c̄ = 516/26 = 19.846
    // the UCL is 33.211, so it is compared to 1 dp (and the book's arithmetic is checked as such).
    expect(out.limits.ucl).toBeCloseTo(33.22, 1);
    expect(19.85 + 3 * Math.sqrt(19.85)).toBeCloseTo(33.22, 2);
    expect(out.limits.lcl).toBeCloseTo(6.48, 2);
    expect(flagged(out)).toEqual([6, 20]);
  });
  it('suggests excluding 6 and 20; revised c̄ 19.67, UCL 32.97, LCL 6.36 leave nothing else out', () => {
    expect(out.phase1?.suggestedExclusions.map((s) => s.index)).toEqual([6, 20]);
    const revised = run({ chart: 'c', counts: counts.filter((_, i) => i !== 5 && i !== 19) });
    expect(revised.limits.center).toBeCloseTo(19.67, 2);
    expect(revised.limits.ucl).toBeCloseTo(32.97, 2);
    expect(revised.limits.lcl).toBeCloseTo(6.36, 2);
  });
});

describe('u chart — Montgomery personal-computer assembly (Example 7.4), 20 samples of 5 computers', () => {
  // Data as distributed with the R package qcc (data/pcmanufact.txt).
  const counts = [10, 12, 8, 14, 10, 16, 11, 7, 10, 15, 9, 5, 7, 11, 12, 6, 8, 10, 7, 5];
  const out = run({ chart: 'u', counts, sizes: counts.map(() => 5) });
  it('ū 1.93, UCL 3.79, LCL 0.07 (2 dp); in control', () => {
    expect(out.limits.center).toBeCloseTo(1.93, 2);
    expect(out.limits.ucl).toBeCloseTo(3.79, 2);
    expect(out.limits.lcl).toBeCloseTo(0.07, 2);
    expect(flagged(out)).toEqual([]);
  });
  it('LCL floors at 0 when ū − 3√(ū/n) is negative', () => {
    const small = run({ chart: 'u', counts: [1, 0, 2, 1], sizes: [1, 1, 1, 1] });
    expect(small.limits.lcl).toBe(0);
  });
});

describe('phase-1 range and suggestions', () => {
  it('limits come only from the phase-1 points; later points are judged, not used', () => {
    const values = [10, 10.2, 9.8, 10.1, 9.9, 10, 30, 31];
    const out = run({ chart: 'imr', values, phase1: { first: 1, last: 6 } });
    expect(out.limits.center).toBeCloseTo(10, 10);
    expect(flagged(out)).toEqual([7, 8]);
    expect(out.phase1).toMatchObject({ first: 1, last: 6, suggestedExclusions: [] });
  });
  it('iterative exclusion reports points with their iteration, and never changes the returned limits', () => {
    const values = [10, 10.2, 9.8, 10.1, 9.9, 10, 10.1, 9.9, 10.2, 9.8, 14, 10];
    const out = run({ chart: 'imr', values });
    const first = out.phase1?.suggestedExclusions[0];
    expect(first?.index).toBe(11);
    expect(first?.iteration).toBe(1);
    expect(first?.reason).toMatch(/above the UCL/);
    expect(out.limits.center).toBeCloseTo(values.reduce((a, b) => a + b) / values.length, 10);
  });
  it('dispersion beyond its UCL is reported when we1 is selected', () => {
    const subgroups = [...HARD_BAKE.slice(0, 15).map((r) => r.slice(0, 5)), [1.0, 2.0, 1.5, 1.5, 1.5]];
    const out = run({ chart: 'xbar-r', subgroups, rules: ['we1'] });
    expect(out.points[15]?.violations).toContain('dispersion-ucl');
    const noRule = run({ chart: 'xbar-r', subgroups, rules: ['we4'] });
    expect(noRule.points[15]?.violations).not.toContain('dispersion-ucl');
  });
  it('EWMA and CUSUM say in notes that zone rules are not applied to them', () => {
    const out = run({ chart: 'ewma', values: [1, 2, 3, 2, 1], rules: ['we2'] });
    expect(out.notes[0]).toMatch(/autocorrelated/);
  });
});
