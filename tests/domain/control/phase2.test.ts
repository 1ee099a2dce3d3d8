/**
 * Phase II one subgroup at a time (src/lib/domain/control/phase2.ts): judging points as they
 * arrive must give exactly the verdicts of judging the whole series at once against the same
 * approved limits (the SPC library's evaluateAgainstLimitSet), including run rules that span the
 * calls and the recursive EWMA statistic.
 */
import { describe, expect, it } from 'vitest';
import { judgeSubgroups, SHEWHART_HISTORY } from '../../../src/lib/domain/control/phase2.ts';
import { evaluateAgainstLimitSet, evaluateSpc, limitSetFromEvaluation } from '../../../src/lib/domain/spc/evaluate.ts';
import { SpcEvaluateInputSchema } from '../../../src/lib/shared/spc.ts';

// NIST/SEMATECH e-Handbook §6.3.2.2 flow rates as phase I (x̄ 50.81, MR̄ 1.8778).
const PHASE1 = [49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];
const limits = limitSetFromEvaluation(evaluateSpc(SpcEvaluateInputSchema.parse({ chart: 'imr', values: PHASE1 })));

// A constructed phase II series: a shift upward (WE 2/3/4 fire) then a wild value (WE 1).
const LATER = [50, 51, 49.5, 52, 51, 53.5, 54, 53.8, 53.2, 52.9, 53.6, 54.1, 52.8, 53.9, 60, 50.5, 50.1, 49.8, 51.2, 50.9];
const RULES = ['we1', 'we2', 'we3', 'we4'] as const;

describe('one at a time = all at once (hand-constructed shift, NIST §6.3.2.2 limits)', () => {
  const whole = evaluateAgainstLimitSet({ values: LATER }, limits, { rules: [...RULES] });
  it('the series does signal (so the comparison means something)', () => {
    const ids = new Set(whole.points.flatMap((p) => p.violations));
    expect(ids.has('we1')).toBe(true);
    expect(ids.has('we4') || ids.has('we3') || ids.has('we2')).toBe(true);
  });
  it('every point gets the same value, limits and violations, whatever the batching', () => {
    for (const batch of [1, 3, 7]) {
      const history: number[][] = [];
      const got = [];
      for (let i = 0; i < LATER.length; i += batch) {
        const next = LATER.slice(i, i + batch).map((x) => [x]);
        got.push(...judgeSubgroups(limits, [...RULES], history, next));
        history.push(...next);
      }
      expect(got.map((p) => [p.index, p.value, p.ucl, p.violations])).toEqual(
        whole.points.map((p) => [p.index, p.value, p.ucl, p.violations]),
      );
    }
  });
  it(`Shewhart charts need only the last ${SHEWHART_HISTORY} points of history`, () => {
    const long = [...LATER, ...LATER, ...LATER].map((x) => [x]);
    const all = evaluateAgainstLimitSet({ values: long.map((x) => x[0]!) }, limits, { rules: ['nelson4', 'nelson7', 'we4'] });
    const last = judgeSubgroups(limits, ['nelson4', 'nelson7', 'we4'], long.slice(0, -1), long.slice(-1));
    expect(last[0]?.violations).toEqual(all.points[all.points.length - 1]?.violations);
    expect(last[0]?.index).toBe(long.length);
  });
});

describe('EWMA replays from the start of the set (NIST/SEMATECH e-Handbook §6.3.2.4 data)', () => {
  const values = [
    52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1,
  ];
  const set = limitSetFromEvaluation(
    evaluateSpc(
      SpcEvaluateInputSchema.parse({ chart: 'ewma', values, target: 50, sigma: 2.0539, lambda: 0.3, L: 3, limits: 'asymptotic' }),
    ),
  );
  it('the 20th z is 51.99 (as printed) when the first 19 are history', () => {
    const p = judgeSubgroups(
      set,
      [],
      values.slice(0, 19).map((x) => [x]),
      [[values[19]!]],
    );
    expect(p[0]?.value).toBeCloseTo(51.99, 2);
    expect(p[0]?.index).toBe(20);
  });
});
