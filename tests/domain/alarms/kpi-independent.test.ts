/**
 * Alarm floods by the ANSI/ISA-18.2 definition (a flood starts at more than 10 alarms in 10 min
 * per operator and ends when the rate drops below 5 in 10 min; the figures as public summaries of
 * the standard state them), checked against a brute-force second method that evaluates the
 * trailing 10-minute count at every second, and against the review's counter-example (W5).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { alarmKpis, floodPeriods, type AlarmLogEntry } from '../../../src/lib/domain/alarms/kpi.ts';

const S = 1000;

/** Brute force: the trailing count (t − 600 s, t] at every whole second of [0, toS). */
function bruteFloods(
  timesS: readonly number[],
  toS: number,
  positions: number,
): { startMs: number; endMs: number; count: number }[] {
  const out: { startMs: number; endMs: number }[] = [];
  const inWindow = (t: number) => timesS.filter((a) => a > t - 600 && a <= t);
  let open: number | null = null;
  for (let t = 0; t < toS; t++) {
    const w = inWindow(t);
    if (open === null && w.length > 10 * positions) {
      const start = Math.min(...w);
      const last = out[out.length - 1];
      if (last && start * S <= last.endMs) {
        out.pop();
        open = last.startMs / S;
      } else open = start;
    } else if (open !== null && w.length < 5 * positions) {
      out.push({ startMs: open * S, endMs: t * S });
      open = null;
    }
  }
  if (open !== null) out.push({ startMs: open * S, endMs: toS * S });
  return out.map((p) => ({ ...p, count: timesS.filter((a) => a * S >= p.startMs && a * S < p.endMs).length }));
}

describe('ISA-18.2 floods per operator position (review W5)', () => {
  it('12 alarms in 5.5 min over 2 positions (6 each) is no flood (review counter-example)', () => {
    const log: AlarmLogEntry[] = Array.from({ length: 12 }, (_, k) => ({
      id: k,
      source: `s${k % 3}`,
      priority: 'low',
      activatedAtMs: k * 30 * S,
    }));
    expect(alarmKpis(log, { fromMs: 0, toMs: 3600 * S, operatorPositions: 2 }).floods.periods).toEqual([]);
    expect(alarmKpis(log, { fromMs: 0, toMs: 3600 * S, operatorPositions: 1 }).floods.periods).toHaveLength(1);
  });
  it('22 alarms within 10 min over 2 positions (11 each) is a flood', () => {
    const times = Array.from({ length: 22 }, (_, k) => k * 20 * S);
    expect(floodPeriods(times, 3600 * S, { operatorPositions: 2 })).toHaveLength(1);
  });
  it('the flood lasts while the rate stays at 5 or more per 10 min, and ends below 5', () => {
    // 11 alarms in the first 10 s (flood), then one every 100 s up to 1500 s: 6 per trailing
    // 10 min, so the flood goes on after the burst has left the window; the count falls below 5
    // when the alarm at 1100 s leaves (1100 + 600 = 1700 s: 1200…1500 remain, 4).
    const times = [...Array.from({ length: 11 }, (_, k) => k * S), ...Array.from({ length: 15 }, (_, k) => (100 + 100 * k) * S)];
    times.sort((a, b) => a - b);
    const [p] = floodPeriods(times, 3600 * S);
    expect(p).toEqual({ startMs: 0, endMs: 1700 * S, count: times.length });
  });
  it('property: the sweep agrees with the brute-force trailing count for any log (1–3 positions)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 1799 }), { maxLength: 90 }),
        fc.integer({ min: 1, max: 3 }),
        (raw, positions) => {
          const timesS = [...raw].sort((a, b) => a - b);
          const ours = floodPeriods(
            timesS.map((t) => t * S),
            1800 * S,
            { operatorPositions: positions },
          );
          expect(ours).toEqual(bruteFloods(timesS, 1800, positions));
        },
      ),
      { numRuns: 150 },
    );
  });
  it('property: shifting every alarm and the window by the same time shifts the floods and nothing else', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 3600 }), { maxLength: 60 }),
        fc.integer({ min: 0, max: 1e7 }),
        (raw, shiftS) => {
          const t = [...raw].sort((a, b) => a - b).map((x) => x * S);
          const a = floodPeriods(t, 4000 * S);
          const b = floodPeriods(
            t.map((x) => x + shiftS * S),
            (4000 + shiftS) * S,
          );
          expect(b).toEqual(a.map((p) => ({ ...p, startMs: p.startMs + shiftS * S, endMs: p.endMs + shiftS * S })));
        },
      ),
      { numRuns: 100 },
    );
  });
});
