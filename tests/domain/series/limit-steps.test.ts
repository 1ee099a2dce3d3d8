// Stepping control limits: each point is drawn against the set in force at its time
// (latest effectiveFrom ≤ t; none before the first). Expected values written by hand.
import { describe, it, expect } from 'vitest';
import { limitSegments, limitSetAt, limitsInForce, type LimitSet } from '../../../src/lib/domain/series/limit-steps';

type Named = LimitSet & { name: string };
// Given out of order on purpose; B and C share an instant and C (later in the list) wins.
const A: Named = { name: 'A', effectiveFromMs: 1000, center: 10, ucl: 13, lcl: 7 };
const B: Named = { name: 'B', effectiveFromMs: 5000, center: 11, ucl: 14, lcl: 8 };
const C: Named = { name: 'C', effectiveFromMs: 5000, center: 12, ucl: 15, lcl: 9 };
const D: Named = { name: 'D', effectiveFromMs: 3000, center: 10.5, ucl: 13.5, lcl: 7.5 };
const sets = [A, B, D, C];

describe('limit sets in force', () => {
  it('per point: the latest set with effectiveFrom ≤ t, null before the first', () => {
    const times = [0, 999, 1000, 2999, 3000, 4999, 5000, 1e12, 2000];
    expect(limitsInForce(sets, times).map((s) => s?.name ?? null)).toEqual([
      null, // 0: before A
      null, // 999
      'A', // 1000: A starts exactly here
      'A', // 2999
      'D', // 3000
      'D', // 4999
      'C', // 5000: B and C both start; C is later in the input
      'C', // far future
      'A', // 2000 (times need not be sorted)
    ]);
  });
  it('single time, no sets', () => {
    expect(limitSetAt(sets, 3500)).toBe(D);
    expect(limitSetAt([], 3500)).toBeNull();
    expect(limitsInForce([], [1, 2])).toEqual([null, null]);
  });
  it('segments to draw as steps', () => {
    // [0, 10 000): nothing before 1000; A 1000–3000; D 3000–5000; B replaced at once by C; C 5000–10 000.
    expect(limitSegments(sets, 0, 10_000).map((s) => [s.set.name, s.fromMs, s.toMs])).toEqual([
      ['A', 1000, 3000],
      ['D', 3000, 5000],
      ['C', 5000, 10_000],
    ]);
    // A window inside D's stretch.
    expect(limitSegments(sets, 3500, 4500).map((s) => [s.set.name, s.fromMs, s.toMs])).toEqual([['D', 3500, 4500]]);
  });
  it('does not reorder the caller’s array', () => {
    const copy = [...sets];
    limitsInForce(sets, [4000]);
    expect(sets).toEqual(copy);
  });
});
