// thinLine (src/lib/domain/series/thin-line.ts): LTTB per unbroken stretch of a chart line.
// Every expected value below is hand-computed from the inputs beside it.
import { describe, expect, it } from 'vitest';
import { thinLine } from '../../../src/lib/domain/series/thin-line.ts';

describe('thinLine: LTTB per unbroken stretch, gaps kept', () => {
  it('leaves a line within the target alone', () => {
    const line = [
      { x: 0, y: 1 },
      { x: 1, y: 2 },
    ];
    expect(thinLine(line, 10)).toBe(line);
  });
  it('thins two runs of 10 to 3 points each (share ⌊6·10/20⌋ = 3) and keeps the break between them', () => {
    // Run A: x 0…9, a single peak y = 5 at x 4; run B: x 20…29 flat at 1 except y = −5 at x 27.
    const a = Array.from({ length: 10 }, (_, i) => ({ x: i, y: i === 4 ? 5 : 0 }));
    const b = Array.from({ length: 10 }, (_, i) => ({ x: 20 + i, y: i === 7 ? -5 : 1 }));
    const out = thinLine([...a, { x: 15, y: null }, ...b], 6);
    // LTTB with threshold 3 keeps the first, the point of the largest triangle (the peak), and the last.
    expect(out).toEqual([
      { x: 0, y: 0 },
      { x: 4, y: 5 },
      { x: 9, y: 0 },
      { x: 14.5, y: null },
      { x: 20, y: 1 },
      { x: 27, y: -5 },
      { x: 29, y: 1 },
    ]);
  });
});
