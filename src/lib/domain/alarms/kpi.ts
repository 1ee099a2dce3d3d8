/**
 * Alarm-system performance figures on an alarm log, compared with the benchmark values of
 * ANSI/ISA-18.2-2016 and IEC 62682:2014 (monitoring and assessment / alarm system performance
 * metrics). The benchmark values are common practice benchmarks quoted by the standard, not
 * requirements; the figures below are from memory (they agree with public summaries of the
 * standard but were not checked against its text) and are defaults: the flood thresholds are
 * options of {@link floodPeriods}.
 *
 * Conventions used throughout:
 * - Each log entry is one annunciated alarm (one activation that reached the operator;
 *   shelved, suppressed-by-design and out-of-service activations are not logged as entries).
 * - The analysis window is half-open, `[fromMs, toMs)`; an alarm counts in the window when its
 *   `activatedAtMs` lies in it. All times are epoch ms.
 * - Sliding windows are half-open too: the 10-minute window anchored at an alarm at `a` is
 *   `[a, a + 10 min)`, clipped to the analysis window. The busiest 10-minute window of any
 *   placement always starts at some alarm, so anchoring at each alarm finds the true peak
 *   (rather than fixed clock buckets, which can split a burst in two and under-count it).
 * - Rates and the flood thresholds are per operator position: the log's counts are divided by
 *   the number of positions (the alarms are taken as spread evenly over them); chattering and
 *   the peak count are on the log as supplied.
 */
import type { AlarmPriority } from '../../shared/alarms';

const MINUTE_MS = 60_000;
const TEN_MIN_MS = 10 * MINUTE_MS;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

/** One annunciated alarm in the log. */
export interface AlarmLogEntry {
  id: number | string;
  /** What raised it, e.g. `oven-2/zone-1/air-temp`. */
  source: string;
  priority: AlarmPriority;
  activatedAtMs: number;
  /** When the condition returned to normal; absent/null while still active. */
  clearedAtMs?: number | null | undefined;
  ackedAtMs?: number | null | undefined;
}

/** The analysis window and how many operator positions share the alarms. */
export interface KpiWindow {
  fromMs: number;
  toMs: number;
  /** Operator positions (consoles / people) the alarms are spread over; integer ≥ 1. */
  operatorPositions: number;
}

/**
 * Benchmark values of ANSI/ISA-18.2 (common practice benchmark per ISA-18.2; values from
 * memory, to be checked against the standard's performance-metrics table):
 * average annunciated alarms per operator position ≈ 150/day, 6/h, 1/10 min "very likely
 * acceptable"; ≈ 300/day, 12/h, 2/10 min "maximum manageable"; a flood starts at more than 10
 * alarms in 10 minutes per operator and ends when the rate drops below 5 in 10 minutes; time in flood below about 1 %; stale = active more than 24 h; chattering =
 * 3 or more activations of one source within 60 s (chattering target: none); priority
 * distribution roughly 80 % low, 15 % medium, 5 % high.
 */
export const ISA_18_2_BENCHMARKS = {
  label: 'common practice benchmark per ISA-18.2',
  acceptablePer10Min: 1,
  maxManageablePer10Min: 2,
  acceptablePerHour: 6,
  maxManageablePerHour: 12,
  acceptablePerDay: 150,
  maxManageablePerDay: 300,
  floodMoreThan: 10,
  /** A flood ends when the rate per position drops below 5 alarms in 10 minutes. */
  floodEndsBelow: 5,
  floodWindowMs: TEN_MIN_MS,
  timeInFloodPercentBelow: 1,
  staleAfterMs: DAY_MS,
  chatterCount: 3,
  chatterWindowMs: MINUTE_MS,
  priorityPercentTarget: { low: 80, medium: 15, high: 5 } as Readonly<Record<AlarmPriority, number>>,
} as const;

/** Where the average 10-minute rate sits against the ISA-18.2 common practice benchmark. */
export type AlarmRateBand = 'very-likely-acceptable' | 'maximum-manageable' | 'over-demanding';

/** Plain English for {@link AlarmRateBand}. */
export const RATE_BAND_LABELS: Readonly<Record<AlarmRateBand, string>> = {
  'very-likely-acceptable': 'About 1 per 10 minutes or fewer: very likely acceptable',
  'maximum-manageable': 'Up to about 2 per 10 minutes: the most an operator can manage',
  'over-demanding': 'More than about 2 per 10 minutes: likely over-demanding',
};

/** A merged flood period: `[startMs, endMs)` and the alarms activated in it. */
export interface FloodPeriod {
  startMs: number;
  endMs: number;
  count: number;
}

/** An alarm still active at the end of the window after more than 24 h. */
export interface StaleAlarm {
  id: number | string;
  source: string;
  priority: AlarmPriority;
  activatedAtMs: number;
  /** `toMs − activatedAtMs`. */
  activeForMs: number;
}

/** A source that activated 3 or more times within some 60 s. */
export interface ChatteringSource {
  source: string;
  /** Most activations in any `[a, a + 60 s)` window anchored at one of its activations. */
  maxIn60s: number;
  /** Start of the first such window with at least 3 activations. */
  firstAtMs: number;
  /** All its activations in the analysis window. */
  activations: number;
}

/** A source and its share of the window's alarms. */
export interface SourceCount {
  source: string;
  count: number;
  /** `count / total × 100`. */
  sharePercent: number;
}

/** The figures {@link alarmKpis} returns. */
export interface AlarmKpiReport {
  window: { fromMs: number; toMs: number; durationMs: number; operatorPositions: number };
  /** Alarms activated in `[fromMs, toMs)`. */
  totalAlarms: number;
  rate: {
    averagePer10MinPerPosition: number;
    averagePerHourPerPosition: number;
    averagePerDayPerPosition: number;
    /** Most alarms in any 10-minute sliding window (whole log, not divided). */
    peak10MinCount: number;
    /** Start of the first busiest window, or null without alarms. */
    peak10MinStartMs: number | null;
    peak10MinPerPosition: number;
    band: AlarmRateBand;
    benchmark: string;
  };
  floods: {
    periods: FloodPeriod[];
    timeInFloodMs: number;
    percentTimeInFlood: number;
  };
  stale: StaleAlarm[];
  chattering: ChatteringSource[];
  /** The ten most frequent sources, most frequent first (ties by source name). */
  topSources: SourceCount[];
  priorities: {
    counts: Record<AlarmPriority, number>;
    percent: Record<AlarmPriority, number>;
    /** Roughly 80/15/5 low/medium/high (common practice per ISA-18.2). */
    commonPracticeTargetPercent: Readonly<Record<AlarmPriority, number>>;
  };
}

/** Band of an average rate per operator position per 10 minutes (≤ 1, ≤ 2, > 2; common practice per ISA-18.2). */
export function rateBand(averagePer10MinPerPosition: number): AlarmRateBand {
  if (averagePer10MinPerPosition <= ISA_18_2_BENCHMARKS.acceptablePer10Min) return 'very-likely-acceptable';
  if (averagePer10MinPerPosition <= ISA_18_2_BENCHMARKS.maxManageablePer10Min) return 'maximum-manageable';
  return 'over-demanding';
}

/**
 * Count, for each sorted time `times[i]`, the times in `[times[i], min(times[i] + widthMs, endMs))`.
 * Two-pointer sweep, O(n).
 */
export function slidingCounts(times: readonly number[], widthMs: number, endMs = Number.POSITIVE_INFINITY): number[] {
  const counts: number[] = [];
  let j = 0;
  for (let i = 0; i < times.length; i++) {
    const a = times[i]!;
    const end = Math.min(a + widthMs, endMs);
    if (j < i) j = i;
    while (j < times.length && times[j]! < end) j++;
    counts.push(j - i);
  }
  return counts;
}

/** Thresholds of {@link floodPeriods}; defaults are the ISA-18.2 values per operator position. */
export interface FloodOptions {
  /** Operator positions the alarms are spread over (integer ≥ 1); default 1. */
  operatorPositions?: number;
  /** A flood starts when the 10-minute count per position exceeds this; default 10. */
  startMoreThan?: number;
  /** A flood ends when the 10-minute count per position drops below this; default 5. */
  endBelow?: number;
  widthMs?: number;
}

/**
 * Flood periods by the ANSI/ISA-18.2 definition: a flood starts when more than 10 alarms per
 * operator position are annunciated within 10 minutes, and ends when the rate drops below 5 per
 * position in 10 minutes. The rate at an instant t is the count in the trailing window
 * `(t − 10 min, t]`, divided by the positions.
 * - Start: the first alarm of the trailing window at the arrival that takes the count above
 *   10·positions (the burst belongs to the flood).
 * - End: the first instant after that at which the count falls below 5·positions (an alarm
 *   leaving the window), clipped to `toMs`; a new flood that would start before the previous
 *   one ended is merged into it.
 * - Count: alarms activated in `[start, end)`.
 * One sweep over arrivals and departures (`times` sorted ascending): O(n).
 */
export function floodPeriods(times: readonly number[], toMs: number, options: FloodOptions = {}): FloodPeriod[] {
  const positions = options.operatorPositions ?? 1;
  const startAbove = (options.startMoreThan ?? ISA_18_2_BENCHMARKS.floodMoreThan) * positions;
  const endBelow = (options.endBelow ?? ISA_18_2_BENCHMARKS.floodEndsBelow) * positions;
  const widthMs = options.widthMs ?? ISA_18_2_BENCHMARKS.floodWindowMs;
  const periods: { startMs: number; endMs: number }[] = [];
  let arrived = 0;
  let departed = 0;
  let openStart: number | null = null;
  while (arrived < times.length || departed < arrived) {
    const nextArrival = arrived < times.length ? times[arrived]! : Number.POSITIVE_INFINITY;
    const nextDeparture = departed < arrived ? times[departed]! + widthMs : Number.POSITIVE_INFINITY;
    if (nextDeparture <= nextArrival) {
      // (t − W, t]: an alarm at a leaves the window at exactly a + W, before any arrival at that instant.
      if (nextDeparture >= toMs) break;
      departed += 1;
      if (openStart !== null && arrived - departed < endBelow) {
        periods.push({ startMs: openStart, endMs: nextDeparture });
        openStart = null;
      }
    } else {
      if (nextArrival >= toMs) break;
      arrived += 1;
      if (openStart === null && arrived - departed > startAbove) {
        const start = times[departed]!;
        const last = periods[periods.length - 1];
        if (last && start <= last.endMs) {
          periods.pop();
          openStart = last.startMs;
        } else openStart = start;
      }
    }
  }
  if (openStart !== null) periods.push({ startMs: openStart, endMs: toMs });
  return periods.map((p) => ({ ...p, count: countIn(times, p.startMs, p.endMs) }));
}

/**
 * Alarm KPIs of a log over `[fromMs, toMs)` (ANSI/ISA-18.2 / IEC 62682 alarm performance
 * metrics):
 * - average annunciated alarms per operator position per 10 min, per hour and per day
 *   (`total / positions / (duration / period)`), with the benchmark band;
 * - peak count in any 10-minute sliding window (anchored at each alarm);
 * - flood periods per operator position (see {@link floodPeriods}) and time in flood as % of the window;
 * - stale alarms: not cleared at `toMs` (no `clearedAtMs`, or one after `toMs`) and active
 *   for more than 24 h (`toMs − activatedAtMs > 24 h`); alarms raised before `fromMs` count;
 * - chattering sources: 3 or more activations in some `[a, a + 60 s)`;
 * - the ten most frequent sources with their share of all alarms;
 * - priority distribution (counts and %), beside the ~80/15/5 common practice target.
 *
 * @throws RangeError when `toMs ≤ fromMs` or `operatorPositions` is not an integer ≥ 1.
 */
export function alarmKpis(log: readonly AlarmLogEntry[], window: KpiWindow): AlarmKpiReport {
  const { fromMs, toMs, operatorPositions } = window;
  if (!(toMs > fromMs)) throw new RangeError('the analysis window must end after it starts');
  if (!Number.isInteger(operatorPositions) || operatorPositions < 1) {
    throw new RangeError('operator positions must be a whole number of at least 1');
  }
  const durationMs = toMs - fromMs;
  const inWindow = log
    .filter((e) => e.activatedAtMs >= fromMs && e.activatedAtMs < toMs)
    .sort((a, b) => a.activatedAtMs - b.activatedAtMs);
  const times = inWindow.map((e) => e.activatedAtMs);
  const total = inWindow.length;

  // Rates
  const perPosition = total / operatorPositions;
  const per10 = perPosition / (durationMs / TEN_MIN_MS);
  const counts10 = slidingCounts(times, TEN_MIN_MS, toMs);
  let peak = 0;
  let peakStart: number | null = null;
  for (let i = 0; i < counts10.length; i++) {
    if (counts10[i]! > peak) {
      peak = counts10[i]!;
      peakStart = times[i]!;
    }
  }

  // Floods
  const periods = floodPeriods(times, toMs, { operatorPositions });
  const timeInFloodMs = periods.reduce((s, p) => s + (p.endMs - p.startMs), 0);

  // Stale
  const stale: StaleAlarm[] = log
    .filter(
      (e) =>
        e.activatedAtMs <= toMs &&
        (e.clearedAtMs == null || e.clearedAtMs > toMs) &&
        toMs - e.activatedAtMs > ISA_18_2_BENCHMARKS.staleAfterMs,
    )
    .sort((a, b) => a.activatedAtMs - b.activatedAtMs)
    .map((e) => ({
      id: e.id,
      source: e.source,
      priority: e.priority,
      activatedAtMs: e.activatedAtMs,
      activeForMs: toMs - e.activatedAtMs,
    }));

  // Sources: counts, chattering
  const bySource = new Map<string, number[]>();
  for (const e of inWindow) {
    const list = bySource.get(e.source);
    if (list) list.push(e.activatedAtMs);
    else bySource.set(e.source, [e.activatedAtMs]);
  }
  const chattering: ChatteringSource[] = [];
  for (const [source, ts] of bySource) {
    const c = slidingCounts(ts, ISA_18_2_BENCHMARKS.chatterWindowMs);
    const max = Math.max(...c);
    if (max >= ISA_18_2_BENCHMARKS.chatterCount) {
      const first = c.findIndex((n) => n >= ISA_18_2_BENCHMARKS.chatterCount);
      chattering.push({ source, maxIn60s: max, firstAtMs: ts[first]!, activations: ts.length });
    }
  }
  chattering.sort((a, b) => b.maxIn60s - a.maxIn60s || a.firstAtMs - b.firstAtMs || cmp(a.source, b.source));

  const topSources: SourceCount[] = [...bySource]
    .map(([source, ts]) => ({ source, count: ts.length, sharePercent: (ts.length * 100) / total }))
    .sort((a, b) => b.count - a.count || cmp(a.source, b.source))
    .slice(0, 10);

  // Priorities
  const pc: Record<AlarmPriority, number> = { high: 0, medium: 0, low: 0 };
  for (const e of inWindow) pc[e.priority]++;
  const pct = (n: number) => (total === 0 ? 0 : (n * 100) / total);

  return {
    window: { fromMs, toMs, durationMs, operatorPositions },
    totalAlarms: total,
    rate: {
      averagePer10MinPerPosition: per10,
      averagePerHourPerPosition: perPosition / (durationMs / HOUR_MS),
      averagePerDayPerPosition: perPosition / (durationMs / DAY_MS),
      peak10MinCount: peak,
      peak10MinStartMs: peakStart,
      peak10MinPerPosition: peak / operatorPositions,
      band: rateBand(per10),
      benchmark: ISA_18_2_BENCHMARKS.label,
    },
    floods: { periods, timeInFloodMs, percentTimeInFlood: (timeInFloodMs / durationMs) * 100 },
    stale,
    chattering,
    topSources,
    priorities: {
      counts: pc,
      percent: { high: pct(pc.high), medium: pct(pc.medium), low: pct(pc.low) },
      commonPracticeTargetPercent: ISA_18_2_BENCHMARKS.priorityPercentTarget,
    },
  };
}

function countIn(sorted: readonly number[], startMs: number, endMs: number): number {
  return lowerBound(sorted, endMs) - lowerBound(sorted, startMs);
}

/** First index whose value is ≥ x (binary search on an ascending list). */
function lowerBound(sorted: readonly number[], x: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function cmp(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
