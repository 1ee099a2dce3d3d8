// Fixed-width time bucketing and the bucket-width / data-source choice for chart ranges.
// Expected widths are worked by hand from the ladder 1 s, 5 s, 10 s, 30 s, 1 min, 5 min,
// 10 min, 15 min, 30 min, 1 h, 2 h, 6 h, 12 h, 1 d (our own round steps).
import { describe, it, expect } from 'vitest';
import { BUCKET_LADDER_MS, bucketMinMax, chooseBucketMs, chooseSource } from '../../../src/lib/domain/series/buckets';
import type { XY } from '../../../src/lib/domain/series/lttb';

const S = 1000;
const MIN = 60 * S;
const H = 60 * MIN;
const D = 24 * H;

describe('chooseBucketMs', () => {
  it.each([
    // range, maxPoints, width — hand computation
    [2000 * S, 2000, S], // 2000 / 1 s = 2000 ≤ 2000
    [2001 * S, 2000, 5 * S], // 2001 > 2000; 2001 / 5 = 400.2
    [H, 2000, 5 * S], // 3600 > 2000; 3600 / 5 = 720
    [D, 2000, MIN], // 86 400 s: /1 = 86 400, /5 = 17 280, /10 = 8 640, /30 = 2 880 > 2000; /60 = 1 440
    [7 * D, 2000, 10 * MIN], // 604 800 s: /300 = 2 016 > 2000; /600 = 1 008
    [30 * D, 2000, 30 * MIN], // 2 592 000 s: /900 = 2 880 > 2000; /1 800 = 1 440
    [90 * D, 2000, 2 * H], // 7 776 000 s: /3 600 = 2 160 > 2000; /7 200 = 1 080
    [365 * D, 2000, 6 * H], // 31 536 000 s: /7 200 = 4 380; /21 600 = 1 460
    [3650 * D, 100, 37 * D], // past the ladder: 3 650 d / 1 d = 3 650 > 100 → ⌈3650/100⌉ = 37 d
    [0, 2000, S],
  ])('range %i ms, %i points → %i ms', (range, maxPoints, width) => {
    expect(chooseBucketMs(range, maxPoints)).toBe(width);
    expect(range / chooseBucketMs(range, maxPoints)).toBeLessThanOrEqual(maxPoints);
  });
  it('refuses maxPoints below 1', () => {
    expect(() => chooseBucketMs(H, 0)).toThrow(RangeError);
  });
  it('ladder is increasing', () => {
    for (let i = 1; i < BUCKET_LADDER_MS.length; i++) expect(BUCKET_LADDER_MS[i]!).toBeGreaterThan(BUCKET_LADDER_MS[i - 1]!);
  });
});

describe('chooseSource (1 Hz raw readings, minute and hourly rollups)', () => {
  it.each([
    [2000 * S, 2000, 'raw'], // 2000 s of 1 Hz readings = 2000 points
    [H, 2000, 'raw'], // bucket 5 s < 1 min: raw readings, bucketed
    [12 * H, 2000, 'raw'], // 43 200 s: /30 = 1 440 → 30 s
    [D, 2000, 'minute'], // 1 min
    [7 * D, 2000, 'minute'], // 10 min
    [30 * D, 2000, 'minute'], // 30 min
    [83 * D, 2000, 'hour'], // 7 171 200 s: /1 800 = 3 984 > 2000; /3 600 = 1 992 → 1 h
    [365 * D, 2000, 'hour'], // 6 h
  ] as const)('range %i ms, %i points → %s', (range, maxPoints, source) => {
    expect(chooseSource(range, maxPoints)).toBe(source);
  });
});

describe('bucketMinMax', () => {
  it('half-open buckets: a point on a boundary starts the next bucket; empty buckets omitted', () => {
    // [0, 10 s), 10 buckets → 1 s buckets aligned at 0.
    const pts: XY[] = [
      { x: -1, y: 99 }, // before the range: skipped
      { x: 0, y: 4 }, // bucket [0, 1000)
      { x: 999, y: 2 }, // bucket [0, 1000)
      { x: 1000, y: 7 }, // exactly on a boundary → bucket [1000, 2000)
      { x: 5500, y: 1 }, // bucket [5000, 6000)
      { x: 5600, y: Number.NaN }, // non-finite: skipped
      { x: 9999, y: 3 }, // bucket [9000, 10000)
      { x: 10_000, y: 99 }, // exactly toMs: outside the half-open range
    ];
    expect(bucketMinMax(pts, 0, 10 * S, 10)).toEqual({
      bucketMs: S,
      buckets: [
        { startMs: 0, endMs: 1000, count: 2, min: 2, max: 4, mean: 3 },
        { startMs: 1000, endMs: 2000, count: 1, min: 7, max: 7, mean: 7 },
        { startMs: 5000, endMs: 6000, count: 1, min: 1, max: 1, mean: 1 },
        { startMs: 9000, endMs: 10_000, count: 1, min: 3, max: 3, mean: 3 },
      ],
    });
  });

  it('input order does not matter', () => {
    const pts: XY[] = [
      { x: 2500, y: 1 },
      { x: 100, y: 5 },
      { x: 2400, y: 3 },
    ];
    expect(bucketMinMax(pts, 0, 3 * S, 3).buckets).toEqual([
      { startMs: 0, endMs: 1000, count: 1, min: 5, max: 5, mean: 5 },
      { startMs: 2000, endMs: 3000, count: 2, min: 1, max: 3, mean: 2 },
    ]);
  });

  it('unaligned range: widens when alignment would need one bucket too many', () => {
    // [0.5 s, 10.5 s), 10 buckets: 1 s buckets aligned at 0 would be [0,1) … [10,11) = 11 > 10,
    // so the next width, 5 s: [0,5), [5,10), [10,15) = 3 buckets.
    const pts: XY[] = Array.from({ length: 101 }, (_, i) => ({ x: 500 + i * 100, y: i }));
    const r = bucketMinMax(pts, 500, 10_500, 10);
    expect(r.bucketMs).toBe(5 * S);
    expect(r.buckets.map((b) => [b.startMs, b.count])).toEqual([
      [0, 45], // x = 500 … 4900 → i = 0 … 44
      [5000, 50], // x = 5000 … 9900 → i = 45 … 94
      [10_000, 5], // x = 10 000 … 10 400 → i = 95 … 99 (i = 100 is x = 10 500 = toMs, outside)
    ]);
  });

  it('never more than maxBuckets buckets, and every in-range point counted once', () => {
    const cases: [number, number, number][] = [
      [0, H, 2000],
      [123_456, 123_456 + H, 7],
      [1_700_000_012_345, 1_700_000_012_345 + 3 * D, 2],
      [1_700_000_012_345, 1_700_000_012_345 + 3 * D, 3],
      [1_700_000_000_777, 1_700_000_000_777 + 29 * D + 5 * H, 100],
      [1_700_000_000_777, 1_700_000_000_777 + 400 * D, 5], // past the ladder
      [0, 7 * S, 2000],
    ];
    for (const [from, to, max] of cases) {
      const step = Math.max(1, Math.floor((to - from) / 20_000));
      const pts: XY[] = [];
      for (let x = from; x < to; x += step) pts.push({ x, y: Math.sin(x / 1e5) });
      const r = bucketMinMax(pts, from, to, max);
      expect(r.buckets.length, `${from} ${to} ${max}`).toBeLessThanOrEqual(max);
      expect(r.buckets.reduce((s, b) => s + b.count, 0)).toBe(pts.length);
      for (const b of r.buckets) {
        expect(b.endMs - b.startMs).toBe(r.bucketMs);
        expect(b.min).toBeLessThanOrEqual(b.mean);
        expect(b.mean).toBeLessThanOrEqual(b.max);
      }
    }
  });

  it('one bucket covers the whole range; empty or reversed range gives none', () => {
    const pts: XY[] = [
      { x: 10, y: 1 },
      { x: 20, y: 3 },
    ];
    expect(bucketMinMax(pts, 5, 25, 1)).toEqual({
      bucketMs: 20,
      buckets: [{ startMs: 5, endMs: 25, count: 2, min: 1, max: 3, mean: 2 }],
    });
    expect(bucketMinMax(pts, 25, 5, 10).buckets).toEqual([]);
    expect(bucketMinMax(pts, 5, 5, 10).buckets).toEqual([]);
    expect(() => bucketMinMax(pts, 0, 10, 0)).toThrow(RangeError);
  });
});
