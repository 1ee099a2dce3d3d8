/**
 * Fixed-width time bucketing for long chart ranges: each bucket's min, max, mean and count, so
 * a browser never receives more than about 2 000 points per series (product brief §4) and
 * spikes survive (a min/max band keeps the extremes that a mean or a thinning would hide).
 *
 * Buckets are aligned to multiples of the width since the Unix epoch (so for widths that
 * divide a day they fall on whole UTC seconds, minutes, hours and days, like SQL
 * `date_bin(width, t, '1970-01-01')`), which keeps them fixed while a chart pans or updates
 * live. Each bucket is half-open, `[startMs, startMs + bucketMs)`: a point exactly on a
 * boundary belongs to the bucket that starts there.
 *
 * The ladder of widths is our own choice of round steps. For display only: never feed
 * bucketed data to SPC statistics.
 */
import type { XY } from './lttb';

const SECOND_MS = 1000;
const MINUTE_MS = 60 * SECOND_MS;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

/** Round bucket widths, ms: 1 s, 5 s, 10 s, 30 s, 1 min, 5 min, 10 min, 15 min, 30 min, 1 h, 2 h, 6 h, 12 h, 1 d. */
export const BUCKET_LADDER_MS: readonly number[] = [
  SECOND_MS,
  5 * SECOND_MS,
  10 * SECOND_MS,
  30 * SECOND_MS,
  MINUTE_MS,
  5 * MINUTE_MS,
  10 * MINUTE_MS,
  15 * MINUTE_MS,
  30 * MINUTE_MS,
  HOUR_MS,
  2 * HOUR_MS,
  6 * HOUR_MS,
  12 * HOUR_MS,
  DAY_MS,
];

/**
 * The smallest width `w` of {@link BUCKET_LADDER_MS} with `rangeMs / w ≤ maxPoints`; beyond
 * the ladder, whole days: `⌈rangeMs / maxPoints / 1 d⌉ · 1 d`. A range of 0 or less gives 1 s.
 *
 * @throws RangeError when `maxPoints < 1`.
 */
export function chooseBucketMs(rangeMs: number, maxPoints: number): number {
  if (!(maxPoints >= 1)) throw new RangeError('maxPoints must be at least 1');
  for (const w of BUCKET_LADDER_MS) if (rangeMs / w <= maxPoints) return w;
  return Math.ceil(rangeMs / maxPoints / DAY_MS) * DAY_MS;
}

/** Where chart data for a range should come from: raw readings, the minute rollup or the hourly rollup. */
export type SeriesSource = 'raw' | 'minute' | 'hour';

/**
 * Pick the data source for a chart range (channels sample at about 1 Hz):
 * - `raw` when the range holds at most `maxPoints` seconds (≤ `maxPoints` raw readings), and
 *   also when the chosen bucket ({@link chooseBucketMs}) is shorter than 1 minute (raw readings
 *   bucketed at 5–30 s, since the minute rollup is too coarse);
 * - `minute` when the bucket is at least 1 minute and under 1 hour;
 * - `hour` when the bucket is 1 hour or more.
 */
export function chooseSource(rangeMs: number, maxPoints: number): SeriesSource {
  if (rangeMs / SECOND_MS <= maxPoints) return 'raw';
  const w = chooseBucketMs(rangeMs, maxPoints);
  if (w < MINUTE_MS) return 'raw';
  if (w < HOUR_MS) return 'minute';
  return 'hour';
}

/** One non-empty bucket: `[startMs, endMs)` and the statistics of the points in it. */
export interface MinMaxBucket {
  startMs: number;
  endMs: number;
  count: number;
  min: number;
  max: number;
  mean: number;
}

/**
 * Bucket the points with `x` in `[fromMs, toMs)` into epoch-aligned buckets of one width and
 * return each non-empty bucket's min, max, mean and count, in time order (empty buckets are
 * omitted; points outside the range or with a non-finite `y` are skipped; input order does
 * not matter).
 *
 * The width starts at `chooseBucketMs(toMs − fromMs, maxBuckets)` and moves up the ladder (then
 * whole days) until the aligned buckets touching `[fromMs, toMs)` number at most `maxBuckets`
 * — alignment can add a partial bucket at each end. With `maxBuckets = 1` the single bucket is
 * `[fromMs, toMs)` itself (not aligned).
 *
 * @returns the width used and the buckets; no buckets when `toMs ≤ fromMs`.
 * @throws RangeError when `maxBuckets < 1`.
 */
export function bucketMinMax(
  points: readonly XY[],
  fromMs: number,
  toMs: number,
  maxBuckets: number,
): { bucketMs: number; buckets: MinMaxBucket[] } {
  if (!(maxBuckets >= 1)) throw new RangeError('maxBuckets must be at least 1');
  const max = Math.floor(maxBuckets);
  const range = toMs - fromMs;
  if (!(range > 0)) return { bucketMs: chooseBucketMs(0, max), buckets: [] };

  let w: number;
  let first: number; // start of the first bucket
  let count: number; // buckets touching the range
  if (max === 1) {
    w = range;
    first = fromMs;
    count = 1;
  } else {
    w = chooseBucketMs(range, max);
    while (alignedCount(fromMs, toMs, w) > max) w = nextWidth(w, range, max);
    first = Math.floor(fromMs / w) * w;
    count = alignedCount(fromMs, toMs, w);
  }

  const n = new Array<number>(count).fill(0);
  const lo = new Array<number>(count).fill(Number.POSITIVE_INFINITY);
  const hi = new Array<number>(count).fill(Number.NEGATIVE_INFINITY);
  const sum = new Array<number>(count).fill(0);
  for (const p of points) {
    if (!(p.x >= fromMs && p.x < toMs) || !Number.isFinite(p.y)) continue;
    const k = Math.min(Math.floor((p.x - first) / w), count - 1);
    n[k]!++;
    sum[k]! += p.y;
    if (p.y < lo[k]!) lo[k] = p.y;
    if (p.y > hi[k]!) hi[k] = p.y;
  }

  const buckets: MinMaxBucket[] = [];
  for (let k = 0; k < count; k++) {
    const c = n[k]!;
    if (c === 0) continue;
    const startMs = first + k * w;
    buckets.push({ startMs, endMs: startMs + w, count: c, min: lo[k]!, max: hi[k]!, mean: sum[k]! / c });
  }
  return { bucketMs: w, buckets };
}

/** Number of epoch-aligned buckets of width `w` that touch `[fromMs, toMs)`. */
function alignedCount(fromMs: number, toMs: number, w: number): number {
  return Math.ceil(toMs / w) - Math.floor(fromMs / w);
}

/**
 * The next wider width: the next ladder step, or past the ladder whole days of at least
 * `range / (max − 1)` (which always fits: aligned count ≤ ⌈range / w⌉ + 1 ≤ max).
 */
function nextWidth(w: number, range: number, max: number): number {
  const next = BUCKET_LADDER_MS.find((l) => l > w);
  if (next !== undefined) return next;
  return Math.max(w + DAY_MS, Math.ceil(range / (max - 1) / DAY_MS) * DAY_MS);
}
