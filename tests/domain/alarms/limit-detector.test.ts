// High/low limit alarm with deadband, on-delay and off-delay — the ANSI/ISA-18.2-2016 /
// IEC 62682:2014 alarm design concepts. Signals are constructed; the expected event times are
// worked out by hand in the comments beside each signal (samples at 1 Hz, t in seconds).
import { describe, it, expect } from 'vitest';
import {
  initialDetectorState,
  limitCondition,
  runDetector,
  step,
  type LimitDetectorConfig,
  type Sample,
} from '../../../src/lib/domain/alarms/limit-detector';

/** Samples at 1 Hz from t = 0 s. */
const hz = (values: number[], startS = 0): Sample[] => values.map((v, i) => ({ tMs: (startS + i) * 1000, v }));

describe('limit condition', () => {
  it('limits themselves are inside the window', () => {
    const cfg = { high: 100, low: 50 };
    expect(limitCondition(100, cfg)).toBeNull();
    expect(limitCondition(50, cfg)).toBeNull();
    expect(limitCondition(100.0001, cfg)).toBe('high');
    expect(limitCondition(49.9999, cfg)).toBe('low');
    expect(limitCondition(-1e9, { high: 100 })).toBeNull();
    expect(limitCondition(1e9, { low: 50 })).toBeNull();
  });
});

describe('on-delay, deadband and off-delay (ISA-18.2 alarm design concepts)', () => {
  it('high alarm: on-delay restarts on a sample back inside; clear needs deadband + off-delay', () => {
    const cfg: LimitDetectorConfig = { high: 100, low: 50, deadband: 2, onDelayMs: 3000, offDelayMs: 2000 };
    // t:  0    1    2    3   4    5    6    7    8   9     10  11  12  13  14
    // v: 95  101  102  99  101  103  104  105  99  97.5  97  99  97  96  95
    // t=1: abnormal, on-delay starts (t₀=1). t=3: 99 inside → restart.
    // t=4: t₀=4. t=7: 7−4 = 3 s ≥ 3 s → activate-high at 7 s.
    // Clear threshold 100 − 2 = 98 (strictly below). t=8: 99 no. t=9: 97.5 yes, t₁=9.
    // t=10: 1 s < 2 s. t=11: 99 not eligible → reset. t=12: t₁=12. t=13: 1 s. t=14: 2 s ≥ 2 s → clear at 14 s.
    const s = hz([95, 101, 102, 99, 101, 103, 104, 105, 99, 97.5, 97, 99, 97, 96, 95]);
    expect(runDetector(s, cfg).events).toEqual([
      { tMs: 7000, event: 'activate-high' },
      { tMs: 14000, event: 'clear' },
    ]);
  });

  it('chatter around the limit: no deadband → an event every sample; deadband 2 → one alarm', () => {
    // Value dithers 100.5, 99.5, 100.5, … (10 samples, t = 0…9 s), then 97 at t = 10 s.
    const dither = hz([100.5, 99.5, 100.5, 99.5, 100.5, 99.5, 100.5, 99.5, 100.5, 99.5, 97]);
    const noDeadband: LimitDetectorConfig = { high: 100, deadband: 0, onDelayMs: 0, offDelayMs: 0 };
    // Deadband 0: 100.5 > 100 activates, 99.5 < 100 clears → activate at 0,2,4,6,8 and clear at 1,3,5,7,9;
    // at t = 10 nothing is left to clear. 10 events.
    const chatter = runDetector(dither, noDeadband).events;
    expect(chatter).toHaveLength(10);
    expect(chatter.filter((e) => e.event === 'activate-high').map((e) => e.tMs)).toEqual([0, 2000, 4000, 6000, 8000]);
    // Deadband 2: activate at 0; 99.5 is not below 98, so no clear until 97 at t = 10 s.
    const withDeadband = runDetector(dither, { ...noDeadband, deadband: 2 }).events;
    expect(withDeadband).toEqual([
      { tMs: 0, event: 'activate-high' },
      { tMs: 10000, event: 'clear' },
    ]);
  });

  it('chatter suppressed by an on-delay alone', () => {
    // Same dither, on-delay 1.5 s, no deadband: no abnormal run lasts 1.5 s (each lasts one sample) → no alarm.
    const dither = hz([100.5, 99.5, 100.5, 99.5, 100.5, 99.5]);
    expect(runDetector(dither, { high: 100, deadband: 0, onDelayMs: 1500, offDelayMs: 0 }).events).toEqual([]);
  });

  it('low alarm with on-delay, deadband above the low limit', () => {
    const cfg: LimitDetectorConfig = { high: 100, low: 50, deadband: 2, onDelayMs: 2000, offDelayMs: 0 };
    // t: 0   1   2   3   4   5
    // v: 60  49  48  47  51  53
    // t₀ = 1; t = 3: 3 − 1 = 2 s ≥ 2 s → activate-low at 3 s.
    // Clear needs v > 50 + 2 = 52: t = 4 (51) no; t = 5 (53) yes, off-delay 0 → clear at 5 s.
    expect(runDetector(hz([60, 49, 48, 47, 51, 53]), cfg).events).toEqual([
      { tMs: 3000, event: 'activate-low' },
      { tMs: 5000, event: 'clear' },
    ]);
  });

  it('a jump from high to low clears the high alarm first, then raises the low one', () => {
    const cfg: LimitDetectorConfig = { high: 100, low: 50, deadband: 2, onDelayMs: 0, offDelayMs: 1000 };
    // t = 0: 101 → activate-high (on-delay 0).
    // t = 1: 40 → low on-delay starts (t₀ = 1); eligible to clear high (40 < 98), t₁ = 1, 0 s < 1 s.
    // t = 2: 40 → 2 − 1 = 1 s ≥ 1 s → clear at 2 s (one event per step).
    // t = 3: 40 → no alarm held, low pending since 1 s ≥ 0 → activate-low at 3 s.
    expect(runDetector(hz([101, 40, 40, 40]), cfg).events).toEqual([
      { tMs: 0, event: 'activate-high' },
      { tMs: 2000, event: 'clear' },
      { tMs: 3000, event: 'activate-low' },
    ]);
  });

  it('deadband 0: a value exactly at the limit neither activates nor clears', () => {
    const cfg: LimitDetectorConfig = { high: 100, deadband: 0, onDelayMs: 0, offDelayMs: 0 };
    expect(runDetector(hz([100, 100]), cfg).events).toEqual([]);
    // 101 activates; 100 is not back inside "by more than" 0; 99.99 clears.
    expect(runDetector(hz([101, 100, 99.99]), cfg).events).toEqual([
      { tMs: 0, event: 'activate-high' },
      { tMs: 2000, event: 'clear' },
    ]);
  });

  it('irregular sample times: delays are measured on sample times', () => {
    const cfg: LimitDetectorConfig = { low: 10, deadband: 0.5, onDelayMs: 60_000, offDelayMs: 30_000 };
    const s: Sample[] = [
      { tMs: 0, v: 9 }, // t₀ = 0
      { tMs: 59_999, v: 9 }, // 59.999 s < 60 s
      { tMs: 60_000, v: 9.9 }, // 60 s → activate-low at 60 000
      { tMs: 70_000, v: 10.4 }, // 10.4 ≤ 10.5 not eligible
      { tMs: 80_000, v: 10.6 }, // eligible, t₁ = 80 000
      { tMs: 110_000, v: 10.7 }, // 30 s ≥ 30 s → clear at 110 000
    ];
    expect(runDetector(s, cfg).events).toEqual([
      { tMs: 60_000, event: 'activate-low' },
      { tMs: 110_000, event: 'clear' },
    ]);
  });

  it('ignores NaN values and out-of-order samples, and does not mutate the state', () => {
    const cfg: LimitDetectorConfig = { high: 100, deadband: 0, onDelayMs: 0, offDelayMs: 0 };
    const s0 = initialDetectorState();
    const a = step(s0, { tMs: 5000, v: 101 }, cfg);
    expect(a.event).toBe('activate-high');
    expect(s0).toEqual(initialDetectorState());
    expect(step(a.state, { tMs: 6000, v: Number.NaN }, cfg)).toEqual({ state: a.state });
    expect(step(a.state, { tMs: 4000, v: 0 }, cfg)).toEqual({ state: a.state });
    expect(step(a.state, { tMs: 6000, v: 0 }, cfg).event).toBe('clear');
  });

  it('runDetector continues from a saved state', () => {
    const cfg: LimitDetectorConfig = { high: 100, deadband: 0, onDelayMs: 2000, offDelayMs: 0 };
    const first = runDetector(hz([101, 101]), cfg); // pending since 0, 1 s so far
    expect(first.events).toEqual([]);
    const rest = runDetector(hz([101], 2), cfg, first.state); // 2 s → activate at 2 s
    expect(rest.events).toEqual([{ tMs: 2000, event: 'activate-high' }]);
  });
});
