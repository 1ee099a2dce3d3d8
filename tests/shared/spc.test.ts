import { describe, expect, it } from 'vitest';
import { SpcEvaluateInputSchema, SpcLimitSetSchema } from '../../src/lib/shared/spc.ts';

const paths = (input: unknown): string[] => {
  const r = SpcEvaluateInputSchema.safeParse(input);
  return r.success ? [] : r.error.issues.map((i) => i.path.join('.'));
};

const sg5 = [
  [1, 2, 3, 4, 5],
  [2, 3, 4, 5, 6],
  [1, 3, 5, 7, 9],
];

describe('SpcEvaluateInputSchema rejects bad input with field paths', () => {
  it.each([
    ['unknown chart', { chart: 'xbar-mr', values: [1, 2] }, 'chart'],
    ['NaN among values', { chart: 'imr', values: [1, 2, Number.NaN] }, 'values.2'],
    ['infinite value', { chart: 'imr', values: [Number.POSITIVE_INFINITY, 2] }, 'values.0'],
    [
      'non-finite measurement inside a subgroup',
      {
        chart: 'xbar-r',
        subgroups: [
          [1, 2],
          [3, Number.NEGATIVE_INFINITY],
        ],
      },
      'subgroups.1.1',
    ],
    ['too few values for limits', { chart: 'imr', values: [1] }, 'values'],
    ['too few subgroups', { chart: 'xbar-s', subgroups: [[1, 2, 3]] }, 'subgroups'],
    ['unequal subgroup sizes (X̄-R)', { chart: 'xbar-r', subgroups: [...sg5, [1, 2, 3, 4]] }, 'subgroups.3'],
    [
      'unequal subgroup sizes (X̄-S)',
      {
        chart: 'xbar-s',
        subgroups: [
          [1, 2, 3],
          [1, 2, 3, 4],
          [1, 2, 3],
        ],
      },
      'subgroups.1',
    ],
    ['subgroup of one', { chart: 'xbar-r', subgroups: [[1], [2]] }, 'subgroups.0'],
    [
      'subgroup larger than 25',
      { chart: 'xbar-s', subgroups: [Array.from({ length: 26 }, (_, i) => i), Array.from({ length: 26 }, (_, i) => i)] },
      'subgroups.0',
    ],
    ['negative count', { chart: 'c', counts: [3, -1, 2] }, 'counts.1'],
    ['fractional count', { chart: 'c', counts: [3, 1.5, 2] }, 'counts.1'],
    ['count above sample size (p)', { chart: 'p', counts: [51, 3], sizes: [50, 50] }, 'counts.0'],
    ['count above sample size (np)', { chart: 'np', counts: [3, 60], sizes: [50, 50] }, 'counts.1'],
    ['missing sizes (p)', { chart: 'p', counts: [1, 2] }, 'sizes'],
    ['missing sizes (np)', { chart: 'np', counts: [1, 2] }, 'sizes'],
    ['missing sizes (u)', { chart: 'u', counts: [1, 2] }, 'sizes'],
    ['sizes and counts of different length', { chart: 'u', counts: [1, 2, 3], sizes: [1, 1] }, 'sizes'],
    ['varying n on an np chart', { chart: 'np', counts: [1, 2], sizes: [50, 40] }, 'sizes.1'],
    ['zero sample size', { chart: 'u', counts: [1, 2], sizes: [1, 0] }, 'sizes.1'],
    ['phase1.last beyond the data', { chart: 'imr', values: [1, 2, 3], phase1: { first: 1, last: 4 } }, 'phase1.last'],
    ['phase1.first after last', { chart: 'imr', values: [1, 2, 3], phase1: { first: 3, last: 2 } }, 'phase1.first'],
    ['phase1.first below 1', { chart: 'imr', values: [1, 2, 3], phase1: { first: 0, last: 2 } }, 'phase1.first'],
    ['phase1 of a single point', { chart: 'imr', values: [1, 2, 3], phase1: { first: 2, last: 2 } }, 'phase1'],
    ['lambda 0', { chart: 'ewma', values: [1, 2], lambda: 0 }, 'lambda'],
    ['lambda above 1', { chart: 'ewma', values: [1, 2], lambda: 1.2 }, 'lambda'],
    ['lambda on a non-EWMA chart', { chart: 'imr', values: [1, 2], lambda: 0.2 }, 'lambda'],
    ['unknown rule id', { chart: 'imr', values: [1, 2], rules: ['we1', 'we5'] }, 'rules.1'],
    ['rule listed twice', { chart: 'imr', values: [1, 2], rules: ['we1', 'we1'] }, 'rules.1'],
    ['head start not below h', { chart: 'cusum', values: [1, 2], h: 4, headStart: 4 }, 'headStart'],
    ['non-positive sigma', { chart: 'imr', values: [1, 2], sigma: 0 }, 'sigma'],
    ['sigma on an attribute chart', { chart: 'c', counts: [1, 2], sigma: 1 }, 'sigma'],
    ['p0 outside (0, 1)', { chart: 'p', counts: [1, 2], sizes: [5, 5], target: 1.5 }, 'target'],
    ['spec with no limits', { chart: 'imr', values: [1, 2], spec: {} }, 'spec'],
    ['spec with lsl above usl', { chart: 'imr', values: [1, 2], spec: { lsl: 5, usl: 4 } }, 'spec.usl'],
    ['spec target outside the limits', { chart: 'imr', values: [1, 2], spec: { lsl: 1, usl: 4, target: 5 } }, 'spec.target'],
    ['values posted to an X̄-R chart', { chart: 'xbar-r', values: [1, 2, 3] }, 'values'],
    ['both values and subgroups for EWMA', { chart: 'ewma', values: [1, 2], subgroups: sg5 }, 'values'],
  ])('%s → %s', (_, input, path) => {
    expect(paths(input)).toContain(path);
  });

  it('accepts well-formed requests for every chart', () => {
    const ok = [
      { chart: 'xbar-r', subgroups: sg5, phase1: { first: 1, last: 3 }, rules: ['we1', 'nelson5'], spec: { lsl: 0, usl: 10 } },
      { chart: 'xbar-s', subgroups: sg5 },
      { chart: 'imr', values: [1, 2, 3] },
      { chart: 'ewma', values: [1, 2, 3], lambda: 1, L: 2.7, limits: 'asymptotic' },
      { chart: 'ewma', subgroups: sg5, target: 4, sigma: 1 },
      { chart: 'cusum', values: [5], target: 5, sigma: 1, k: 0.5, h: 5, headStart: 2.5 },
      { chart: 'p', counts: [1, 2], sizes: [50, 60] },
      { chart: 'np', counts: [1, 2], sizes: [50, 50] },
      { chart: 'c', counts: [0, 0, 4] },
      { chart: 'u', counts: [1, 2], sizes: [0.5, 2.5] },
    ];
    for (const input of ok) expect(paths(input)).toEqual([]);
  });

  it('approved limit sets are validated too', () => {
    const bad = SpcLimitSetSchema.safeParse({
      chart: 'imr',
      center: 1,
      ucl: 0,
      lcl: 2,
      sigma: null,
      subgroupSize: 1,
      dispersion: null,
    });
    expect(bad.success).toBe(false);
    const issuePaths = bad.success ? [] : bad.error.issues.map((i) => i.path.join('.'));
    expect(issuePaths).toEqual(expect.arrayContaining(['ucl', 'sigma', 'dispersion']));
  });
});
