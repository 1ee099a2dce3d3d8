/**
 * Control-limit studies (src/lib/domain/control/study.ts): limits from the included points only,
 * suggestions never applied, the overall-σ basis, and a published X̄-R example end to end.
 */
import { describe, expect, it } from 'vitest';
import { runStudy, StudyError } from '../../../src/lib/domain/control/study.ts';

const d2n2 = 2 / Math.sqrt(Math.PI); // d2 for n = 2, 1.128 (Montgomery App. VI)

describe('I-MR study with an exclusion (hand-computed)', () => {
  const xs = [10, 10.2, 9.9, 10.1, 14, 10, 9.8, 10.1, 10.2, 9.9];
  const groups = xs.map((x) => [x]);
  it('suggests the wild value but computes limits from every point until it is excluded', () => {
    const s = runStudy({ chart: 'imr', params: {}, rules: ['we1'], spec: null }, groups, new Set());
    expect(s.suggested.map((x) => x.index)).toContain(5);
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    expect(s.limitSet.center).toBeCloseTo(mean, 12);
    expect(s.includedPoints).toBe(10);
  });
  it('excluding point 5 drops it and both moving ranges that touch it', () => {
    const s = runStudy({ chart: 'imr', params: {}, rules: ['we1'], spec: null }, groups, new Set([5]));
    const kept = xs.filter((_, i) => i !== 4);
    const center = kept.reduce((a, b) => a + b, 0) / kept.length; // 10.0222…
    const mrs = [0.2, 0.3, 0.2, 0.2, 0.3, 0.1, 0.3]; // |Δ| between consecutive kept points, skipping 4→5 and 5→6
    const sigma = mrs.reduce((a, b) => a + b, 0) / mrs.length / d2n2;
    expect(s.limitSet.center).toBeCloseTo(center, 12);
    expect(s.limitSet.sigma).toBeCloseTo(sigma, 12);
    expect(s.limitSet.ucl).toBeCloseTo(center + 3 * sigma, 12);
    expect(s.points[4]?.violations).toContain('we1'); // still judged, just not used for the limits
    expect(s.points[4]?.inPhase1).toBe(false);
  });
  it('refuses exclusions outside the baseline and a baseline with nothing left', () => {
    expect(() => runStudy({ chart: 'imr', params: {}, rules: [], spec: null }, groups, new Set([11]))).toThrow(StudyError);
    expect(() =>
      runStudy({ chart: 'imr', params: {}, rules: [], spec: null }, groups, new Set([1, 2, 3, 4, 5, 6, 7, 8, 9])),
    ).toThrow(/At least 2 points/);
  });
});

describe('overall σ basis (hand-computed)', () => {
  it('σ is the sample standard deviation of the included observations', () => {
    const xs = [1, 2, 3, 4, 5];
    const s = runStudy(
      { chart: 'imr', params: { sigmaBasis: 'overall' }, rules: ['we1'], spec: null },
      xs.map((x) => [x]),
      new Set(),
    );
    expect(s.limitSet.sigma).toBeCloseTo(Math.sqrt(2.5), 12); // s² = 10/4
    expect(s.limitSet.ucl).toBeCloseTo(3 + 3 * Math.sqrt(2.5), 12);
    expect(s.notes.join(' ')).toMatch(/overall standard deviation/);
  });
});

describe('X̄-R study — Montgomery hard-bake flow width (Table 6.1; same transcription as tests/domain/spc)', () => {
  const HARD_BAKE = [
    [1.3235, 1.4128, 1.6744, 1.4573, 1.6914],
    [1.4314, 1.3592, 1.6075, 1.4666, 1.6109],
    [1.4284, 1.4871, 1.4932, 1.4324, 1.5674],
    [1.5028, 1.6352, 1.3841, 1.2831, 1.5507],
    [1.5604, 1.2735, 1.5265, 1.4363, 1.6441],
    [1.5955, 1.5451, 1.3574, 1.3281, 1.4198],
    [1.6274, 1.5064, 1.8366, 1.4177, 1.5144],
    [1.419, 1.4303, 1.6637, 1.6067, 1.5519],
    [1.3884, 1.7277, 1.5355, 1.5176, 1.3688],
    [1.4039, 1.6697, 1.5089, 1.4627, 1.522],
    [1.4158, 1.7667, 1.4278, 1.5928, 1.4181],
    [1.5821, 1.3355, 1.5777, 1.3908, 1.7559],
    [1.2856, 1.4106, 1.4447, 1.6398, 1.1928],
    [1.4951, 1.4036, 1.5893, 1.6458, 1.4969],
    [1.3589, 1.2863, 1.5996, 1.2497, 1.5471],
    [1.5747, 1.5301, 1.5171, 1.1839, 1.8662],
    [1.368, 1.7269, 1.3957, 1.5014, 1.4449],
    [1.4163, 1.3864, 1.3057, 1.621, 1.5573],
    [1.5796, 1.4185, 1.6541, 1.5116, 1.7247],
    [1.7106, 1.4412, 1.2361, 1.382, 1.7601],
    [1.4371, 1.5051, 1.3485, 1.567, 1.488],
    [1.4738, 1.5936, 1.6583, 1.4973, 1.472],
    [1.5917, 1.5551, 1.4333, 1.5295, 1.6866],
    [1.6399, 1.5243, 1.5705, 1.5563, 1.553],
    [1.5797, 1.3663, 1.624, 1.3732, 1.6887],
  ];
  it('x̿ 1.5056, UCL 1.6932, LCL 1.3180, R̄ 0.32521, Cp ≈ 1.19 (spec 1.50 ± 0.50 µm); nothing suggested', () => {
    const s = runStudy({ chart: 'xbar-r', params: {}, rules: ['we1'], spec: { lsl: 1, usl: 2 } }, HARD_BAKE, new Set());
    expect(s.limitSet.center).toBeCloseTo(1.5056, 4);
    expect(s.limitSet.ucl).toBeCloseTo(1.6932, 4);
    expect(s.limitSet.lcl).toBeCloseTo(1.318, 4);
    expect(s.limitSet.dispersion?.center).toBeCloseTo(0.32521, 5);
    expect(s.capability?.cp).toBeCloseTo(1.19, 2);
    expect(s.suggested).toEqual([]);
    expect(s.notes).toEqual([]);
  });
});
