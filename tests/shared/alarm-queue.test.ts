/**
 * The queue's pure rules (src/lib/shared/alarm-queue.ts): views, order, merging live updates,
 * when the audible cue sounds, and the sparkline's scaling. Expected values are hand-computed.
 */
import { describe, expect, it } from 'vitest';
import { inView, mergeAlarm, shouldSound, sortQueue, sparkline } from '../../src/lib/shared/alarm-queue.ts';
import type { AlarmView } from '../../src/lib/shared/alarm-views.ts';

function alarm(id: number, patch: Partial<AlarmView> = {}): AlarmView {
  return {
    id,
    sourceKind: 'limit',
    sourceKey: `channel:${id}:high`,
    sourceLabel: `Source ${id}`,
    assetId: null,
    assetName: null,
    channelId: id,
    characteristicId: null,
    loadId: null,
    priority: 'medium',
    message: 'm',
    value: null,
    limit: null,
    state: 'unacked',
    active: true,
    raisedAtMs: 1000 * id,
    lastActivatedAtMs: 1000 * id,
    clearedAtMs: null,
    ackedAtMs: null,
    ackedBy: null,
    shelvedUntilMs: null,
    escalationStepsSent: [],
    activationCount: 1,
    updatedAtMs: 1000 * id,
    ...patch,
  };
}

describe('queue views and order', () => {
  it('open = annunciated states; held = shelved, suppressed, out of service; recent = all', () => {
    expect(inView(alarm(1, { state: 'rtn-unacked' }), 'open')).toBe(true);
    expect(inView(alarm(1, { state: 'acked' }), 'open')).toBe(true);
    expect(inView(alarm(1, { state: 'shelved' }), 'open')).toBe(false);
    expect(inView(alarm(1, { state: 'out-of-service' }), 'held')).toBe(true);
    expect(inView(alarm(1, { state: 'normal' }), 'held')).toBe(false);
    expect(inView(alarm(1, { state: 'normal' }), 'recent')).toBe(true);
  });

  it('waiting first, then high → low, then active before cleared, then newest', () => {
    const list = [
      alarm(1, { state: 'acked', priority: 'high' }),
      alarm(2, { priority: 'low' }),
      alarm(3, { priority: 'high', state: 'rtn-unacked', active: false }),
      alarm(4, { priority: 'high' }),
      alarm(5, { priority: 'high' }),
      alarm(6, { priority: 'medium' }),
    ];
    // waiting: 2 (low), 3 (high, cleared), 4 (high), 5 (high), 6 (medium); then 1 (acked).
    expect(sortQueue(list).map((a) => a.id)).toEqual([5, 4, 3, 6, 2, 1]);
    expect(sortQueue(list, 'newest').map((a) => a.id)).toEqual([6, 5, 4, 3, 2, 1]);
  });
});

describe('live updates and the audible cue', () => {
  it('keeps the newer version of an alarm', () => {
    const m = new Map([[1, alarm(1, { updatedAtMs: 5000, state: 'acked' })]]);
    expect(mergeAlarm(m, alarm(1, { updatedAtMs: 4000, state: 'unacked' })).get(1)!.state).toBe('acked');
    expect(mergeAlarm(m, alarm(1, { updatedAtMs: 6000, state: 'normal' })).get(1)!.state).toBe('normal');
    expect(m.get(1)!.state).toBe('acked'); // the input map is not changed
  });

  it('sounds for new high and medium alarms needing acknowledgement, not for low or repeats', () => {
    expect(shouldSound(undefined, alarm(1, { priority: 'high' }))).toBe(true);
    expect(shouldSound(undefined, alarm(1, { priority: 'low' }))).toBe(false);
    expect(shouldSound(alarm(1, { state: 'unacked' }), alarm(1, { state: 'unacked' }))).toBe(false);
    expect(shouldSound(alarm(1, { state: 'rtn-unacked' }), alarm(1, { state: 'unacked' }))).toBe(true);
    expect(shouldSound(undefined, alarm(1, { state: 'acked' }))).toBe(false);
  });
});

describe('sparkline', () => {
  it('scales time to x and value to y (2 px padding), marks the alarm time and the limit, breaks at gaps', () => {
    // Box 100 × 24; range 0–1000 ms; values 0 and 10, limit 5 → y = 2 + (1 − (v − 0)/10) × 20.
    const s = sparkline(
      [
        { t: 0, v: 0 },
        { t: 500, v: 10 },
        { t: 1000, v: 0 },
      ],
      0,
      1000,
      100,
      24,
      { alarmAtMs: 250, limit: 5, gapMs: 400 },
    )!;
    expect(s.path).toBe('M0.0,22.0M50.0,2.0M100.0,22.0'); // every step is longer than the 400 ms gap
    expect(s.alarmX).toBe(25);
    expect(s.limitY).toBe(12);
    expect([s.min, s.max]).toEqual([0, 10]);
    expect(sparkline([], 0, 1000, 100, 24)).toBeNull();
    const joined = sparkline(
      [
        { t: 0, v: 1 },
        { t: 100, v: 1 },
      ],
      0,
      1000,
      100,
      24,
    )!;
    expect(joined.path).toBe('M0.0,12.0L10.0,12.0'); // flat line: range widened to 0–2
  });
});
