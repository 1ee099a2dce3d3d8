/**
 * Rational subgrouping of channel readings into control-chart subgroups (Montgomery,
 * *Introduction to Statistical Quality Control*, §5.3.4: subgroups chosen so that variation
 * within them is only common-cause variation; raw 1 Hz samples are autocorrelated and would
 * flood a Shewhart chart with false signals). Pure: the caller passes the readings that arrived
 * after the characteristic's last plotted point, and gets back the subgroups that are complete.
 * Incomplete subgroups are not returned; the caller re-reads their readings next time, so no
 * state is held between calls (safe across worker restarts).
 *
 * The rules (see `SubgroupRuleSchema` in `lib/shared/characteristics.ts` for the user's words):
 * - per dip stroke: each reading is one stroke's mean; n consecutive readings form a subgroup.
 * - per manual check: each reading is a check; readings closer than the minimum spacing to the
 *   last check taken are skipped; n = 1.
 * - per N minutes, `first`: the first n readings of each clock window (epoch-aligned) form its
 *   subgroup, which closes at the n-th reading; later readings of that window are not used.
 * - per N minutes, `means`: when the window has ended (a later reading arrived, or the clock passed
 *   its end), its readings are split into n consecutive blocks of nearly equal count
 *   (sizes ⌊m/n⌋ or ⌈m/n⌉, larger blocks first) and each block's mean is one member. Fewer than n
 *   readings in a window: no subgroup for that window.
 * Units: times in epoch milliseconds; values in the channel's unit.
 */
import type { SubgroupRule } from '../../shared/characteristics.ts';

/** One stored reading of a source channel. */
export interface SourceReading {
  channelId: number;
  tMs: number;
  value: number;
}

/** A complete subgroup ready to be judged. */
export interface FormedSubgroup {
  /** The n members (observations, or block means). */
  values: number[];
  /** Time of the first and the last reading used (the subgroup closes at `tMs`). */
  tFromMs: number;
  tMs: number;
  /** The raw readings behind the subgroup. */
  readings: SourceReading[];
  /** Idempotency key, unique per characteristic (e.g. the window start or the first reading time). */
  key: string;
}

/** Where the last plotted point left off. */
export interface LastPoint {
  tMs: number;
  key: string | null;
}

function byTime(a: SourceReading, b: SourceReading): number {
  return a.tMs - b.tMs || a.channelId - b.channelId;
}

function mean(xs: readonly number[]): number {
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

/** Epoch-aligned window start of `tMs` for windows of `minutes`. */
export function windowStart(tMs: number, minutes: number): number {
  const w = minutes * 60_000;
  return Math.floor(tMs / w) * w;
}

/**
 * Split m readings into n consecutive blocks of nearly equal count (larger blocks first) and
 * return each block's mean; null when m < n.
 */
export function blockMeans(values: readonly number[], n: number): number[] | null {
  const m = values.length;
  if (m < n || n < 1) return null;
  const base = Math.floor(m / n);
  const extra = m % n;
  const out: number[] = [];
  let at = 0;
  for (let b = 0; b < n; b += 1) {
    const size = base + (b < extra ? 1 : 0);
    out.push(mean(values.slice(at, at + size)));
    at += size;
  }
  return out;
}

/**
 * Complete subgroups from `readings` (any order; only those strictly after `last.tMs` are used)
 * under `rule` with subgroup size `n`. `nowMs` closes time windows that received no later reading.
 * `per-oven-load` subgroups come from closed loads, not from readings: it returns none here.
 */
export function formSubgroups(
  rule: SubgroupRule,
  n: number,
  readings: readonly SourceReading[],
  last: LastPoint | null,
  nowMs: number,
): FormedSubgroup[] {
  const fresh = readings.filter((r) => last === null || r.tMs > last.tMs).sort(byTime);
  const out: FormedSubgroup[] = [];
  switch (rule.kind) {
    case 'per-oven-load':
      return out;
    case 'per-dip-stroke': {
      for (let i = 0; i + n <= fresh.length; i += n) {
        const rs = fresh.slice(i, i + n);
        out.push({
          values: rs.map((r) => r.value),
          tFromMs: rs[0]!.tMs,
          tMs: rs[rs.length - 1]!.tMs,
          readings: rs,
          key: `r:${rs[0]!.tMs}:${rs[0]!.channelId}`,
        });
      }
      return out;
    }
    case 'per-manual-check': {
      const spacing = rule.minSpacingMinutes * 60_000;
      let lastTaken = last?.tMs ?? null;
      for (const r of fresh) {
        if (lastTaken !== null && r.tMs - lastTaken < spacing) continue;
        out.push({ values: [r.value], tFromMs: r.tMs, tMs: r.tMs, readings: [r], key: `r:${r.tMs}:${r.channelId}` });
        lastTaken = r.tMs;
      }
      return out;
    }
    case 'per-n-minutes': {
      const width = rule.minutes * 60_000;
      const doneWindow = last ? windowStart(last.tMs, rule.minutes) : Number.NEGATIVE_INFINITY;
      const windows = new Map<number, SourceReading[]>();
      for (const r of fresh) {
        const w = windowStart(r.tMs, rule.minutes);
        if (w <= doneWindow) continue;
        const list = windows.get(w);
        if (list) list.push(r);
        else windows.set(w, [r]);
      }
      const starts = [...windows.keys()].sort((a, b) => a - b);
      const newest = starts[starts.length - 1];
      for (const w of starts) {
        const rs = windows.get(w)!;
        if (rule.mode === 'first') {
          if (rs.length < n) continue;
          const used = rs.slice(0, n);
          out.push({
            values: used.map((r) => r.value),
            tFromMs: used[0]!.tMs,
            tMs: used[n - 1]!.tMs,
            readings: used,
            key: `w:${w}`,
          });
        } else {
          const ended = w !== newest || nowMs >= w + width;
          if (!ended) continue;
          const values = blockMeans(
            rs.map((r) => r.value),
            n,
          );
          if (!values) continue;
          out.push({ values, tFromMs: rs[0]!.tMs, tMs: rs[rs.length - 1]!.tMs, readings: rs, key: `w:${w}` });
        }
      }
      return out;
    }
  }
}
