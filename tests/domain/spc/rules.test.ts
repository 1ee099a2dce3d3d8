import { describe, expect, it } from 'vitest';
import { evaluateRunRules, type RulePoint } from '../../../src/lib/domain/spc/rules.ts';
import type { SpcRuleId } from '../../../src/lib/shared/spc.ts';

// Rule statements: Western Electric Statistical Quality Control Handbook (1956), rules 1–4;
// L. S. Nelson, J. Quality Technology 16(4), 1984, tests 1–8. Centre 0, σ 1, limits ±3 unless noted.
const pts = (values: readonly number[], sigma = 1): RulePoint[] =>
  values.map((value) => ({ value, center: 0, sigma, ucl: 3 * sigma, lcl: -3 * sigma }));

/** 1-based indexes of the points where `rule` completes. */
const firing = (values: readonly number[], rule: SpcRuleId): number[] =>
  evaluateRunRules(pts(values), [rule]).flatMap((ids, i) => (ids.length > 0 ? [i + 1] : []));

const rep = (v: number, n: number) => Array.from({ length: n }, () => v);

interface Case {
  rule: SpcRuleId;
  what: string;
  fires: readonly number[];
  at: readonly number[];
  nearMiss: readonly number[];
  why: string;
}

const CASES: readonly Case[] = [
  {
    rule: 'we1',
    what: 'one point beyond 3σ',
    fires: [0, 1, 3.5, -3.2, 3],
    at: [3, 4],
    nearMiss: [2.99, 3, -3],
    why: 'a point exactly on a limit is not beyond it',
  },
  {
    rule: 'nelson1',
    what: 'one point beyond 3σ',
    fires: [0, -3.01],
    at: [2],
    nearMiss: [-3, 2.999],
    why: 'on the limit is inside',
  },
  {
    rule: 'we2',
    what: '2 of 3 beyond 2σ, same side',
    fires: [0, 2.5, 0.5, 2.1],
    at: [4],
    nearMiss: [2.5, 0.5, 0.5, 2.1],
    why: 'the two points are four apart, not within three',
  },
  {
    rule: 'nelson5',
    what: '2 of 3 beyond 2σ, same side',
    fires: [-2.2, -2.4],
    at: [2],
    nearMiss: [2.5, 0, -2.5, 2.0],
    why: 'opposite sides, and 2.0 is on the zone line',
  },
  {
    rule: 'we3',
    what: '4 of 5 beyond 1σ, same side',
    fires: [1.5, 1.2, 0.3, 1.1, 1.9],
    at: [5],
    nearMiss: [1.5, 1.2, 0.3, 1.0, 1.9],
    why: '1.0 is on the 1σ line, not beyond',
  },
  {
    rule: 'nelson6',
    what: '4 of 5 beyond 1σ, same side',
    fires: [-1.5, -1.2, -1.1, -1.9],
    at: [4],
    nearMiss: [-1.5, -1.2, 1.1, -1.9, 0],
    why: 'one of the four is on the other side',
  },
  {
    rule: 'we4',
    what: '8 in a row on one side',
    fires: [...rep(0.1, 8), 0.2],
    at: [8, 9],
    nearMiss: [...rep(0.1, 7), 0, 0.1],
    why: 'a point on the centre line breaks the run',
  },
  {
    rule: 'nelson2',
    what: '9 in a row on one side',
    fires: [...rep(-0.3, 9)],
    at: [9],
    nearMiss: [...rep(-0.3, 8), 0.3],
    why: 'the ninth point crosses over',
  },
  {
    rule: 'nelson3',
    what: '6 points steadily increasing (5 rises)',
    fires: [0, 0.1, 0.2, 0.3, 0.4, 0.5],
    at: [6],
    nearMiss: [0, 0.1, 0.2, 0.2, 0.3, 0.4, 0.5],
    why: 'a tie breaks the trend (only four rises after it)',
  },
  {
    rule: 'nelson3',
    what: '6 points steadily decreasing',
    fires: [5, 0.5, 0.4, 0.3, 0.2, 0.1, 0],
    at: [6, 7],
    nearMiss: [0.5, 0.4, 0.3, 0.2, 0.1],
    why: 'five points make only four falls',
  },
  {
    rule: 'nelson4',
    what: '14 points alternating',
    fires: Array.from({ length: 14 }, (_, i) => (i % 2 === 0 ? 0.2 : -0.2)),
    at: [14],
    nearMiss: Array.from({ length: 14 }, (_, i) => (i === 7 ? 0.2 : i % 2 === 0 ? 0.2 : -0.2)),
    why: 'points 7 and 8 are equal: a tie breaks the alternation',
  },
  {
    rule: 'nelson7',
    what: '15 in a row within 1σ',
    fires: [...rep(0.5, 7), 1.0, ...rep(-0.5, 7)],
    at: [15],
    nearMiss: [...rep(0.5, 7), 1.01, ...rep(-0.5, 7)],
    why: 'point 8 is beyond 1σ; exactly 1σ would count as within',
  },
  {
    rule: 'nelson8',
    what: '8 in a row beyond 1σ, either side',
    fires: [1.5, -1.5, 2, -2, 1.2, -1.2, 1.1, -1.1],
    at: [8],
    nearMiss: [1.5, -1.5, 2, -2, 1.0, -1.2, 1.1, -1.1],
    why: 'point 5 is on the 1σ line, inside zone C',
  },
];

describe('run rules: each fires exactly where its pattern completes, and not on a near miss', () => {
  it.each(CASES)('$rule — $what', ({ rule, fires, at, nearMiss }) => {
    expect(firing(fires, rule)).toEqual(at);
    expect(firing(nearMiss, rule)).toEqual([]);
  });

  it('Western Electric rules and the matching Nelson tests agree (we1=nelson1, we2=nelson5, we3=nelson6)', () => {
    const series = [0.3, 2.5, -0.4, 2.2, 1.4, 1.6, 0.2, 1.3, 3.4, -3.1, 1.2, 1.1, 1.7];
    expect(firing(series, 'we1')).toEqual(firing(series, 'nelson1'));
    expect(firing(series, 'we2')).toEqual(firing(series, 'nelson5'));
    expect(firing(series, 'we3')).toEqual(firing(series, 'nelson6'));
  });

  it('we4 needs 8 and nelson2 needs 9 points on one side', () => {
    const eight = rep(0.4, 8);
    expect(firing(eight, 'we4')).toEqual([8]);
    expect(firing(eight, 'nelson2')).toEqual([]);
  });

  it('judges each point with its own sigma when limits vary (p and u charts with varying n)', () => {
    // Point 2 is 2.5 above the centre: beyond 2σ when its σ is 1, not when its σ is 1.5.
    const tight: RulePoint[] = [
      { value: 2.2, center: 0, sigma: 1, ucl: 3, lcl: -3 },
      { value: 2.5, center: 0, sigma: 1, ucl: 3, lcl: -3 },
    ];
    const loose: RulePoint[] = [tight[0] as RulePoint, { value: 2.5, center: 0, sigma: 1.5, ucl: 4.5, lcl: -4.5 }];
    expect(evaluateRunRules(tight, ['we2'])[1]).toEqual(['we2']);
    expect(evaluateRunRules(loose, ['we2'])[1]).toEqual([]);
  });

  it('reports several rules on one point in the order they were selected', () => {
    const series = [2.5, 2.6, 3.2];
    expect(evaluateRunRules(pts(series), ['nelson5', 'nelson1'])[2]).toEqual(['nelson5', 'nelson1']);
  });

  it('applies only rule 1 when sigma is 0 (no zones can be drawn)', () => {
    const flat: RulePoint[] = rep(5, 16).map((value) => ({ value, center: 5, sigma: 0, ucl: 5, lcl: 5 }));
    expect(evaluateRunRules(flat, ['we1', 'we2', 'we3', 'nelson7', 'nelson8']).flat()).toEqual([]);
  });
});
