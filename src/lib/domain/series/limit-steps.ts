/**
 * Control limits that step over time: which limit set was in force at each plotted point, so
 * a chart draws the limits each point was judged against (Phase II monitoring uses the approved
 * limits in force at the time; a new approval starts a new step rather than redrawing the past
 * — the usual practice of control charting, e.g. D. C. Montgomery, "Introduction to Statistical
 * Quality Control", on revising control limits; cited from memory).
 *
 * Rule: the set in force at time `t` is the one with the latest `effectiveFromMs ≤ t`; before
 * the first set there is none (`null`). When two sets share an `effectiveFromMs`, the one
 * later in the input wins (a same-instant correction replaces the earlier entry).
 */

/** One approved limit set: in force from `effectiveFromMs` (epoch ms) until the next set. */
export interface LimitSet {
  effectiveFromMs: number;
  center: number;
  ucl: number;
  lcl: number;
}

/** The sets ordered by `effectiveFromMs`, ties kept in input order (stable sort). */
function ordered<L extends LimitSet>(sets: readonly L[]): L[] {
  return [...sets].sort((a, b) => a.effectiveFromMs - b.effectiveFromMs);
}

/** Index of the last set with `effectiveFromMs ≤ t` in `sorted`, or −1. Binary search. */
function lastAtOrBefore(sorted: readonly LimitSet[], t: number): number {
  let lo = 0;
  let hi = sorted.length; // first index with effectiveFromMs > t
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid]!.effectiveFromMs <= t) lo = mid + 1;
    else hi = mid;
  }
  return lo - 1;
}

/** The limit set in force at `tMs` (latest `effectiveFromMs ≤ tMs`), or `null` before the first. */
export function limitSetAt<L extends LimitSet>(sets: readonly L[], tMs: number): L | null {
  const sorted = ordered(sets);
  return sorted[lastAtOrBefore(sorted, tMs)] ?? null;
}

/**
 * For each point time, the limit set in force then (see the module rule), in the order of
 * `timesMs`; `null` for times before the first set. O((s + p) log s).
 */
export function limitsInForce<L extends LimitSet>(sets: readonly L[], timesMs: readonly number[]): (L | null)[] {
  const sorted = ordered(sets);
  return timesMs.map((t) => sorted[lastAtOrBefore(sorted, t)] ?? null);
}

/** A stretch of time `[fromMs, toMs)` with one limit set in force. */
export interface LimitSegment<L extends LimitSet = LimitSet> {
  fromMs: number;
  toMs: number;
  set: L;
}

/**
 * The stretches of `[fromMs, toMs)` with one set in force each, in time order — what a chart
 * draws as horizontal steps. Time before the first set has no segment; sets replaced at the
 * same instant give none either.
 */
export function limitSegments<L extends LimitSet>(sets: readonly L[], fromMs: number, toMs: number): LimitSegment<L>[] {
  const sorted = ordered(sets);
  const out: LimitSegment<L>[] = [];
  for (let i = 0; i < sorted.length; i++) {
    const set = sorted[i]!;
    const start = Math.max(fromMs, set.effectiveFromMs);
    const end = Math.min(toMs, sorted[i + 1]?.effectiveFromMs ?? Number.POSITIVE_INFINITY);
    if (end > start) out.push({ fromMs: start, toMs: end, set });
  }
  return out;
}
