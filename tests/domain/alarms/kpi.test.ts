// Alarm KPIs against the ANSI/ISA-18.2-2016 / IEC 62682:2014 performance metrics
// (benchmarks: ≈1 alarm per 10 min per operator very likely acceptable, ≈2 maximum manageable,
// flood > 10 in 10 min, stale > 24 h, chattering ≥ 3 in 60 s — common practice, values from
// memory as listed in shared/references.md (the brief) "Alarms"). The log is constructed; every
// expected value is computed by hand in the comments.
import { describe, it, expect } from 'vitest';
import {
  ISA_18_2_BENCHMARKS,
  alarmKpis,
  floodPeriods,
  rateBand,
  slidingCounts,
  type AlarmLogEntry,
} from '../../../src/lib/domain/alarms/kpi';

const S = 1000;
const MIN = 60 * S;
const H = 60 * MIN;

let nextId = 1;
const entry = (
  source: string,
  priority: AlarmLogEntry['priority'],
  activatedAtMs: number,
  clearedAtMs?: number,
): AlarmLogEntry => ({ id: nextId++, source, priority, activatedAtMs, clearedAtMs: clearedAtMs ?? null });

// Window [0, 2 h), 2 operator positions.
//
// Before the window (only matter for stale alarms; toMs = 2 h):
//   oven-1/tc-1      high   at −30 h, never cleared         → active 32 h > 24 h: STALE (115 200 000 ms)
//   bath-2/temp      medium at −22 h, never cleared         → active exactly 24 h: not stale (needs > 24 h)
//   room/rh          low    at −30 h, cleared at −1 h       → cleared before the end: not stale
//   uv-1/irradiance  low    at −23 h, cleared at +3 h       → still active at 2 h, active 25 h: STALE (90 000 000 ms)
// In the window:
//   dip-2/speed      low    at 0:00:00 (exactly fromMs: counts)
//   dip-1/speed      low    at 0:10:00, 0:10:20, 0:10:40     → 3 within 40 s: CHATTERING
//   oven-2/zone-1    medium at 0:30:00, 0:30:30, 0:31:00     → [30:00, 31:00) holds only 2: not chattering
//   flood burst, 12 alarms every 30 s from 1:00:00 to 1:05:30:
//     bath-1/viscosity medium at 1:00, 1:01, …, 1:05 (6)
//     line-2/speed     low    at 1:00:30, 1:01:30, …, 1:05:30 (6)
//   oven-3/tc-2      high   at 1:40:00
//   dip-2/speed      low    at 2:00:00 (exactly toMs: excluded)
const log: AlarmLogEntry[] = [
  entry('oven-1/tc-1', 'high', -30 * H),
  entry('bath-2/temp', 'medium', -22 * H),
  entry('room/rh', 'low', -30 * H, -1 * H),
  entry('uv-1/irradiance', 'low', -23 * H, 3 * H),
  entry('dip-2/speed', 'low', 0, 5 * MIN),
  entry('dip-1/speed', 'low', 10 * MIN, 10 * MIN + 5 * S),
  entry('dip-1/speed', 'low', 10 * MIN + 20 * S, 10 * MIN + 25 * S),
  entry('dip-1/speed', 'low', 10 * MIN + 40 * S, 10 * MIN + 45 * S),
  entry('oven-2/zone-1', 'medium', 30 * MIN, 30 * MIN + 10 * S),
  entry('oven-2/zone-1', 'medium', 30 * MIN + 30 * S, 30 * MIN + 40 * S),
  entry('oven-2/zone-1', 'medium', 31 * MIN, 31 * MIN + 10 * S),
  ...Array.from({ length: 12 }, (_, k) =>
    k % 2 === 0
      ? entry('bath-1/viscosity', 'medium', H + k * 30 * S, H + 20 * MIN)
      : entry('line-2/speed', 'low', H + k * 30 * S, H + k * 30 * S + 10 * S),
  ),
  entry('oven-3/tc-2', 'high', H + 40 * MIN),
  entry('dip-2/speed', 'low', 2 * H),
];

describe('alarm KPIs on a constructed log (ISA-18.2 common practice benchmarks)', () => {
  // Shuffle the log to show the order of entries does not matter.
  const shuffled = [...log].reverse();
  const r = alarmKpis(shuffled, { fromMs: 0, toMs: 2 * H, operatorPositions: 2 });

  it('counts the alarms activated in [from, to)', () => {
    // 1 (dip-2 at 0) + 3 (dip-1) + 3 (oven-2) + 12 (burst) + 1 (oven-3) = 20; the one at 2:00:00 is out.
    expect(r.totalAlarms).toBe(20);
    expect(r.window).toEqual({ fromMs: 0, toMs: 2 * H, durationMs: 2 * H, operatorPositions: 2 });
  });

  it('average rates per operator position and the benchmark band', () => {
    // 2 h = 12 ten-minute periods: 20 / 2 positions / 12 = 0.8333… per 10 min → ≤ 1: very likely acceptable.
    expect(r.rate.averagePer10MinPerPosition).toBeCloseTo(20 / 2 / 12, 12);
    // per hour: 20 / 2 / 2 h = 5; per day: 5 × 24 = 120.
    expect(r.rate.averagePerHourPerPosition).toBeCloseTo(5, 12);
    expect(r.rate.averagePerDayPerPosition).toBeCloseTo(120, 12);
    expect(r.rate.band).toBe('very-likely-acceptable');
    expect(r.rate.benchmark).toBe('common practice benchmark per ISA-18.2');
  });

  it('peak 10-minute count (sliding windows anchored at each alarm)', () => {
    // [1:00:00, 1:10:00) holds the whole burst of 12; no other window holds more than 3.
    expect(r.rate.peak10MinCount).toBe(12);
    expect(r.rate.peak10MinStartMs).toBe(H);
    expect(r.rate.peak10MinPerPosition).toBe(6);
  });

  it('flood periods are per operator position: the 12-alarm burst shared by 2 positions is no flood (review W5)', () => {
    // 12 alarms in 5.5 min over 2 positions = 6 per position in 10 min, not more than 10.
    expect(r.floods.periods).toEqual([]);
    expect(r.floods.timeInFloodMs).toBe(0);
  });

  it('the same log on one position: flood from 1:00:00 until the 10-minute count drops below 5', () => {
    // The 11th alarm (1:05:00) takes the trailing count above 10; the window's first alarm is
    // 1:00:00. Alarms leave the window 10 min after they came: the count is 12 at 1:05:30, 11 after
    // 1:10:00 … and 4 (< 5) after the 8th departure, 1:03:30 + 10 min = 1:13:30.
    // [1:00:00, 1:13:30) = 810 000 ms with 12 alarms; 810 000 / 7 200 000 = 11.25 %.
    const one = alarmKpis(log, { fromMs: 0, toMs: 2 * H, operatorPositions: 1 });
    expect(one.floods.periods).toEqual([{ startMs: H, endMs: H + 13 * MIN + 30 * S, count: 12 }]);
    expect(one.floods.timeInFloodMs).toBe(810_000);
    expect(one.floods.percentTimeInFlood).toBeCloseTo(11.25, 12);
  });

  it('stale alarms (active > 24 h at the window end)', () => {
    expect(r.stale.map((s) => [s.source, s.activeForMs])).toEqual([
      ['oven-1/tc-1', 32 * H], // 115 200 000 ms
      ['uv-1/irradiance', 25 * H], // 90 000 000 ms
    ]);
  });

  it('chattering sources (≥ 3 activations within 60 s)', () => {
    expect(r.chattering).toEqual([{ source: 'dip-1/speed', maxIn60s: 3, firstAtMs: 10 * MIN, activations: 3 }]);
  });

  it('most frequent sources with share %', () => {
    // 6/20 = 30 %, 3/20 = 15 %, 1/20 = 5 %; ties in name order.
    expect(r.topSources).toEqual([
      { source: 'bath-1/viscosity', count: 6, sharePercent: 30 },
      { source: 'line-2/speed', count: 6, sharePercent: 30 },
      { source: 'dip-1/speed', count: 3, sharePercent: 15 },
      { source: 'oven-2/zone-1', count: 3, sharePercent: 15 },
      { source: 'dip-2/speed', count: 1, sharePercent: 5 },
      { source: 'oven-3/tc-2', count: 1, sharePercent: 5 },
    ]);
  });

  it('priority distribution beside the 80/15/5 common practice target', () => {
    // low: dip-2 1 + dip-1 3 + line-2 6 = 10 (50 %); medium: oven-2 3 + viscosity 6 = 9 (45 %); high: oven-3 1 (5 %).
    expect(r.priorities.counts).toEqual({ high: 1, medium: 9, low: 10 });
    expect(r.priorities.percent.low).toBeCloseTo(50, 12);
    expect(r.priorities.percent.medium).toBeCloseTo(45, 12);
    expect(r.priorities.percent.high).toBeCloseTo(5, 12);
    expect(r.priorities.commonPracticeTargetPercent).toEqual({ low: 80, medium: 15, high: 5 });
  });
});

describe('floods: merging touching windows; overload band', () => {
  // 11 alarms all at 0 s and 11 all at 600 s, window [0, 1 h), one position.
  const burst = (t: number, n: number) => Array.from({ length: n }, () => entry('oven-1/door', 'high', t));
  it('a flood that restarts at the instant it ended is one period', () => {
    // 11 at 0 s: flood from 0. They leave at 600 s (count 0 < 5: the flood ends at 600 s) just
    // as 11 new ones arrive (count 11 > 10: a flood from 600 s) → one period [0, 1200 s) with 22
    // alarms; 1200 / 3600 = 33.33 %.
    const r = alarmKpis([...burst(0, 11), ...burst(600 * S, 11)], { fromMs: 0, toMs: H, operatorPositions: 1 });
    expect(r.floods.periods).toEqual([{ startMs: 0, endMs: 1200 * S, count: 22 }]);
    expect(r.floods.percentTimeInFlood).toBeCloseTo(100 / 3, 12);
    // 22 alarms / 6 ten-minute periods = 3.67 per 10 min > 2 → over-demanding.
    expect(r.rate.band).toBe('over-demanding');
    // All 11 at the same instant are within 60 s: chattering with 11.
    expect(r.chattering).toEqual([{ source: 'oven-1/door', maxIn60s: 11, firstAtMs: 0, activations: 22 }]);
  });
  it('bursts one millisecond apart stay separate', () => {
    const r = alarmKpis([...burst(0, 11), ...burst(600 * S + 1, 11)], { fromMs: 0, toMs: H, operatorPositions: 1 });
    expect(r.floods.periods).toEqual([
      { startMs: 0, endMs: 600 * S, count: 11 },
      { startMs: 600 * S + 1, endMs: 1200 * S + 1, count: 11 },
    ]);
  });
  it('exactly 10 in 10 minutes is not a flood; a window is clipped at the end of the analysis', () => {
    expect(
      floodPeriods(
        Array.from({ length: 10 }, (_, i) => i * S),
        H,
      ),
    ).toEqual([]);
    // 11 alarms at 55 min: the window [55 min, 65 min) is clipped to [55 min, 60 min).
    expect(
      floodPeriods(
        Array.from({ length: 11 }, () => 55 * MIN),
        H,
      ),
    ).toEqual([{ startMs: 55 * MIN, endMs: H, count: 11 }]);
  });
});

describe('KPI helpers and guards', () => {
  it('rate bands at the benchmark edges (≤ 1 / ≤ 2 / > 2 per 10 min)', () => {
    expect(rateBand(0)).toBe('very-likely-acceptable');
    expect(rateBand(1)).toBe('very-likely-acceptable');
    expect(rateBand(1.01)).toBe('maximum-manageable');
    expect(rateBand(2)).toBe('maximum-manageable');
    expect(rateBand(2.01)).toBe('over-demanding');
    expect(ISA_18_2_BENCHMARKS.floodMoreThan).toBe(10);
  });
  it('sliding counts use half-open windows', () => {
    // [0, 60) holds 0, 30; [30, 90) holds 30, 60; [60, 120) holds 60 only… in seconds.
    expect(slidingCounts([0, 30 * S, 60 * S], 60 * S)).toEqual([2, 2, 1]);
  });
  it('only the ten most frequent sources are listed', () => {
    // Source s01 once, s02 twice, …, s12 twelve times: 78 alarms; top ten are s12 … s03.
    const many: AlarmLogEntry[] = [];
    for (let k = 1; k <= 12; k++) {
      for (let i = 0; i < k; i++) many.push(entry(`s${String(k).padStart(2, '0')}`, 'low', (k * 100 + i) * MIN));
    }
    const r = alarmKpis(many, { fromMs: 0, toMs: 2000 * MIN, operatorPositions: 1 });
    expect(r.topSources.map((s) => s.source)).toEqual(['s12', 's11', 's10', 's09', 's08', 's07', 's06', 's05', 's04', 's03']);
    expect(r.topSources[0]!.sharePercent).toBeCloseTo((12 / 78) * 100, 12);
  });
  it('an empty log gives zeros, not NaN', () => {
    const r = alarmKpis([], { fromMs: 0, toMs: H, operatorPositions: 1 });
    expect(r.totalAlarms).toBe(0);
    expect(r.rate.peak10MinCount).toBe(0);
    expect(r.rate.peak10MinStartMs).toBeNull();
    expect(r.priorities.percent).toEqual({ high: 0, medium: 0, low: 0 });
    expect(r.floods.percentTimeInFlood).toBe(0);
  });
  it('refuses an empty window or a bad position count', () => {
    expect(() => alarmKpis([], { fromMs: 5, toMs: 5, operatorPositions: 1 })).toThrow(RangeError);
    expect(() => alarmKpis([], { fromMs: 0, toMs: H, operatorPositions: 0 })).toThrow(RangeError);
    expect(() => alarmKpis([], { fromMs: 0, toMs: H, operatorPositions: 1.5 })).toThrow(RangeError);
  });
});
