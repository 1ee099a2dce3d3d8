/**
 * Rational subgrouping of readings (src/lib/domain/control/subgroups.ts). Expected values are
 * hand-computed from the constructed readings.
 */
import { describe, expect, it } from 'vitest';
import { blockMeans, formSubgroups, windowStart, type SourceReading } from '../../../src/lib/domain/control/subgroups.ts';

const MIN = 60_000;
const r = (tMs: number, value: number, channelId = 1): SourceReading => ({ channelId, tMs, value });

describe('block means (hand-computed)', () => {
  it('splits m readings into n consecutive blocks, larger blocks first', () => {
    expect(blockMeans([1, 2, 3, 4, 5], 2)).toEqual([2, 4.5]); // (1+2+3)/3, (4+5)/2
    expect(blockMeans([1, 2, 3, 4, 5, 6], 3)).toEqual([1.5, 3.5, 5.5]);
    expect(blockMeans([7], 1)).toEqual([7]);
    expect(blockMeans([1, 2], 3)).toBeNull();
  });
});

describe('per dip stroke', () => {
  const rs = [r(1000, 2.0), r(2000, 2.1), r(3000, 1.9), r(4000, 2.05), r(5000, 2.02)];
  it('one reading = one stroke = one point (n = 1)', () => {
    const sg = formSubgroups({ kind: 'per-dip-stroke' }, 1, rs, null, 10_000);
    expect(sg.map((s) => s.values)).toEqual([[2.0], [2.1], [1.9], [2.05], [2.02]]);
    expect(sg[2]).toMatchObject({ tFromMs: 3000, tMs: 3000 });
  });
  it('n consecutive strokes form a subgroup; an incomplete one waits', () => {
    const sg = formSubgroups({ kind: 'per-dip-stroke' }, 2, rs, null, 10_000);
    expect(sg.map((s) => s.values)).toEqual([
      [2.0, 2.1],
      [1.9, 2.05],
    ]);
    expect(sg[1]).toMatchObject({ tFromMs: 3000, tMs: 4000 });
  });
  it('only readings after the last point count, in time order whatever the input order', () => {
    const sg = formSubgroups({ kind: 'per-dip-stroke' }, 1, [...rs].reverse(), { tMs: 3000, key: null }, 10_000);
    expect(sg.map((s) => s.tMs)).toEqual([4000, 5000]);
  });
});

describe('per manual check', () => {
  it('readings closer than the spacing to the last check taken are not checks', () => {
    const rs = [r(0, 9), r(10 * MIN, 9.1), r(60 * MIN, 9.2), r(70 * MIN, 9.3), r(125 * MIN, 9.4)];
    const sg = formSubgroups({ kind: 'per-manual-check', minSpacingMinutes: 60 }, 1, rs, null, 200 * MIN);
    expect(sg.map((s) => s.values[0])).toEqual([9, 9.2, 9.4]);
    // Continuing after a stored check at 60 min: 70 is too close, 125 counts.
    const more = formSubgroups(
      { kind: 'per-manual-check', minSpacingMinutes: 60 },
      1,
      rs,
      { tMs: 60 * MIN, key: null },
      200 * MIN,
    );
    expect(more.map((s) => s.values[0])).toEqual([9.4]);
  });
});

describe('per N minutes', () => {
  const w = 10;
  const base = windowStart(1_700_000_000_000, w);
  it('windows are aligned to the epoch', () => {
    expect(base % (w * MIN)).toBe(0);
    expect(windowStart(base + 9 * MIN + 59_999, w)).toBe(base);
  });
  it('"first": the first n readings of each window close its subgroup; the rest of the window is not used', () => {
    const rs = [
      r(base + 1000, 1),
      r(base + 2000, 2),
      r(base + 3000, 3),
      r(base + 4000, 4),
      r(base + w * MIN + 1000, 5),
      r(base + w * MIN + 2000, 6),
    ];
    const sg = formSubgroups({ kind: 'per-n-minutes', minutes: w, mode: 'first' }, 3, rs, null, base + 11 * MIN);
    expect(sg.map((s) => s.values)).toEqual([[1, 2, 3]]); // the second window has only 2 so far
    expect(sg[0]).toMatchObject({ tMs: base + 3000, key: `w:${base}` });
    // After that point, the 4th reading of the same window does not start a new subgroup.
    const after = formSubgroups(
      { kind: 'per-n-minutes', minutes: w, mode: 'first' },
      3,
      rs,
      { tMs: base + 3000, key: `w:${base}` },
      base + 11 * MIN,
    );
    expect(after).toEqual([]);
  });
  it('"means": a window closes when a later reading arrives or the clock passes its end; each member is a block mean', () => {
    const rs = [r(base + 1000, 1), r(base + 2000, 2), r(base + 3000, 3), r(base + 4000, 4), r(base + 5000, 5)];
    const open = formSubgroups({ kind: 'per-n-minutes', minutes: w, mode: 'means' }, 2, rs, null, base + 5 * MIN);
    expect(open).toEqual([]);
    const byClock = formSubgroups({ kind: 'per-n-minutes', minutes: w, mode: 'means' }, 2, rs, null, base + w * MIN);
    expect(byClock.map((s) => s.values)).toEqual([[2, 4.5]]);
    const byLater = formSubgroups(
      { kind: 'per-n-minutes', minutes: w, mode: 'means' },
      2,
      [...rs, r(base + w * MIN + 10, 9)],
      null,
      base + 5 * MIN,
    );
    expect(byLater.map((s) => s.values)).toEqual([[2, 4.5]]);
    expect(byLater[0]?.readings).toHaveLength(5);
  });
  it('"means": a window with fewer than n readings gives no subgroup', () => {
    const rs = [r(base + 1000, 1), r(base + w * MIN + 1000, 2)];
    expect(formSubgroups({ kind: 'per-n-minutes', minutes: w, mode: 'means' }, 2, rs, null, base + 3 * w * MIN)).toEqual([]);
  });
  it('pools several channels in time order', () => {
    const rs = [r(base + 2000, 20, 2), r(base + 1000, 10, 1), r(base + 3000, 30, 1)];
    const sg = formSubgroups({ kind: 'per-n-minutes', minutes: w, mode: 'first' }, 3, rs, null, base + w * MIN);
    expect(sg[0]?.values).toEqual([10, 20, 30]);
  });
});

describe('per oven load', () => {
  it('comes from closed loads, never from readings', () => {
    expect(formSubgroups({ kind: 'per-oven-load' }, 1, [r(1, 110)], null, 10)).toEqual([]);
  });
});
