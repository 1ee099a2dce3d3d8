/**
 * Largest-Triangle-Three-Buckets (LTTB) downsampling for drawing long series.
 *
 * Source: S. Steinarsson, "Downsampling Time Series for Visual Representation", MSc thesis,
 * Faculty of Industrial Engineering, Mechanical Engineering and Computer Science, University of
 * Iceland, 2013 (the LTTB algorithm).
 *
 * Method: keep the first and the last point; split the points between them into
 * `threshold − 2` buckets of (fractional) size `every = (n − 2) / (threshold − 2)` — bucket `i`
 * holds indexes `⌊i·every⌋ + 1 … ⌊(i+1)·every⌋` — and from each bucket keep the point `P`
 * that forms the largest triangle with the point kept from the previous bucket `A` and the
 * average `C` of the next bucket (for the last bucket, `C` is the last point):
 *
 *     area = ½ · |(Aₓ − Cₓ)(P_y − A_y) − (Aₓ − Pₓ)(C_y − A_y)|
 *
 * Ties keep the earliest point. Output points are the input objects themselves (extra fields
 * survive). The input must be sorted by `x` with finite coordinates.
 *
 * For display only: never feed downsampled data to SPC statistics or capability figures.
 */

/** A point of a series: `x` (usually epoch ms) and `y` (the value). */
export interface XY {
  x: number;
  y: number;
}

/**
 * Downsample `points` to `threshold` points by LTTB (Steinarsson 2013). When `threshold` is
 * not less than the number of points, or below 3, or not a number, a copy of the input is
 * returned unchanged. A fractional threshold is rounded down.
 */
export function lttb<P extends XY>(points: readonly P[], threshold: number): P[] {
  const n = points.length;
  const m = Math.floor(threshold);
  if (!(m >= 3) || m >= n) return points.slice();

  const sampled: P[] = [points[0]!];
  const every = (n - 2) / (m - 2);
  let a = 0;

  for (let i = 0; i < m - 2; i++) {
    // Average of the next bucket (the last point when this is the final bucket).
    const avgStart = Math.floor((i + 1) * every) + 1;
    const avgEnd = Math.min(Math.floor((i + 2) * every) + 1, n);
    let avgX = 0;
    let avgY = 0;
    for (let j = avgStart; j < avgEnd; j++) {
      avgX += points[j]!.x;
      avgY += points[j]!.y;
    }
    const avgLen = avgEnd - avgStart;
    avgX /= avgLen;
    avgY /= avgLen;

    // This bucket.
    const from = Math.floor(i * every) + 1;
    const to = Math.floor((i + 1) * every) + 1;
    const A = points[a]!;
    let maxArea = -1;
    let chosen = from;
    for (let j = from; j < to; j++) {
      const P = points[j]!;
      const area = 0.5 * Math.abs((A.x - avgX) * (P.y - A.y) - (A.x - P.x) * (avgY - A.y));
      if (area > maxArea) {
        maxArea = area;
        chosen = j;
      }
    }
    sampled.push(points[chosen]!);
    a = chosen;
  }

  sampled.push(points[n - 1]!);
  return sampled;
}
