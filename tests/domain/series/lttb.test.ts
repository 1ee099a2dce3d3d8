// Largest-Triangle-Three-Buckets: S. Steinarsson, "Downsampling Time Series for Visual
// Representation", MSc thesis, University of Iceland, 2013. A small example worked by hand,
// then the algorithm's invariants.
import { describe, it, expect } from 'vitest';
import { lttb, type XY } from '../../../src/lib/domain/series/lttb';

describe('LTTB — hand-worked example (Steinarsson 2013)', () => {
  // 7 points, threshold 4 → keep P0 and P6, and one point from each of 2 buckets.
  // every = (7 − 2) / (4 − 2) = 2.5
  // Bucket 0: indexes ⌊0·2.5⌋+1 = 1 … ⌊1·2.5⌋+1 = 3 (exclusive) → P1, P2.
  //   Next bucket (for the average): 3 … ⌊2·2.5⌋+1 = 6 (exclusive) → P3, P4, P5:
  //   C = ((3+4+5)/3, (2+8+3)/3) = (4, 13/3). A = P0 = (0, 0).
  //   area = ½|(Aₓ−Cₓ)(P_y−A_y) − (Aₓ−Pₓ)(C_y−A_y)| = ½|−4·P_y + (13/3)·Pₓ|
  //   P1 (1,1): ½|−4 + 13/3|  = 1/6 ≈ 0.167
  //   P2 (2,5): ½|−20 + 26/3| = 17/3 ≈ 5.667  ← largest, keep P2
  // Bucket 1: indexes 3 … 6 (exclusive) → P3, P4, P5. Next "bucket" 6 … ⌊3·2.5⌋+1 = 8 → clipped
  //   to 7 → only P6: C = (6, 4). A = P2 = (2, 5).
  //   area = ½|(2−6)(P_y−5) − (2−Pₓ)(4−5)| = ½|22 − 4·P_y − Pₓ|
  //   P3 (3,2): ½|22 − 8 − 3|  = 5.5
  //   P4 (4,8): ½|22 − 32 − 4| = 7    ← largest, keep P4 (shoelace check on (2,5),(4,8),(6,4): 7 ✓)
  //   P5 (5,3): ½|22 − 12 − 5| = 2.5
  // Result: P0, P2, P4, P6.
  const pts: XY[] = [
    { x: 0, y: 0 },
    { x: 1, y: 1 },
    { x: 2, y: 5 },
    { x: 3, y: 2 },
    { x: 4, y: 8 },
    { x: 5, y: 3 },
    { x: 6, y: 4 },
  ];
  it('keeps P0, P2, P4, P6', () => {
    expect(lttb(pts, 4)).toEqual([
      { x: 0, y: 0 },
      { x: 2, y: 5 },
      { x: 4, y: 8 },
      { x: 6, y: 4 },
    ]);
  });
  it('threshold 3: one bucket P1…P5 against A = P0 and C = P6', () => {
    // every = 5; bucket 0 = indexes 1…5; C = P6 = (6, 4); A = (0, 0).
    // area = ½|(0−6)(P_y) − (0−Pₓ)(4)| = ½|−6·P_y + 4·Pₓ|
    // P1: ½|−6+4| = 1; P2: ½|−30+8| = 11; P3: ½|−12+12| = 0; P4: ½|−48+16| = 16 ← keep; P5: ½|−18+20| = 1.
    expect(lttb(pts, 3).map((p) => p.x)).toEqual([0, 4, 6]);
  });
  it('returns the input unchanged (as a copy) when threshold ≥ length or < 3', () => {
    for (const t of [7, 8, 1000, 2, 1, 0, -5, Number.NaN]) {
      const out = lttb(pts, t);
      expect(out, String(t)).toEqual(pts);
      expect(out).not.toBe(pts);
    }
    expect(lttb([], 10)).toEqual([]);
  });
});

describe('LTTB — invariants', () => {
  // Deterministic pseudo-random walk (LCG, Numerical Recipes constants), 1 Hz timestamps.
  let seed = 12345;
  const rand = () => {
    seed = (seed * 1664525 + 1013904223) % 4294967296;
    return seed / 4294967296;
  };
  const series: XY[] = [];
  let y = 20;
  for (let i = 0; i < 1000; i++) {
    y += rand() - 0.5;
    series.push({ x: 1_700_000_000_000 + i * 1000, y });
  }

  it.each([3, 4, 5, 10, 100, 500, 998, 999])('threshold %i: length, first/last kept, x increasing, input points only', (t) => {
    const out = lttb(series, t);
    expect(out).toHaveLength(t);
    expect(out[0]).toBe(series[0]);
    expect(out[out.length - 1]).toBe(series[series.length - 1]);
    for (let i = 1; i < out.length; i++) expect(out[i]!.x).toBeGreaterThan(out[i - 1]!.x);
    const inputs = new Set(series);
    for (const p of out) expect(inputs.has(p)).toBe(true);
  });

  it('keeps a single spike that plain thinning would lose', () => {
    const flat: XY[] = Array.from({ length: 1000 }, (_, i) => ({ x: i, y: i === 503 ? 100 : 0 }));
    expect(lttb(flat, 20).some((p) => p.y === 100)).toBe(true);
  });

  it('keeps extra fields and does not modify the input', () => {
    const tagged = series.map((p, i) => ({ ...p, i }));
    const before = JSON.stringify(tagged);
    const out = lttb(tagged, 50);
    expect(out.every((p) => tagged[p.i] === p)).toBe(true);
    expect(JSON.stringify(tagged)).toBe(before);
  });
});
