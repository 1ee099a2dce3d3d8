// Escalation of unacknowledged alarms (Coatrail's own rule set; see escalation.ts). Times are
// worked out by hand: raised at R, steps after 5 and 15 minutes → due at R + 300 000 ms and
// R + 900 000 ms.
import { describe, it, expect } from 'vitest';
import {
  canEscalate,
  dueEscalations,
  nextEscalationAtMs,
  type EscalatableAlarm,
  type EscalationRules,
} from '../../../src/lib/domain/alarms/escalation';
import { ALARM_STATES, type AlarmState } from '../../../src/lib/domain/alarms/state';
import { EscalationRuleSchema } from '../../../src/lib/shared/alarms';

const R = 1_700_000_000_000;
const MIN = 60_000;
const rules: EscalationRules = {
  high: [
    { afterMinutes: 5, notify: 'on-shift-engineer' },
    { afterMinutes: 15, notify: 'lab-manager' },
  ],
  medium: [{ afterMinutes: 60, notify: 'on-shift-engineer' }],
  // low: no escalation
};
const alarm = (over: Partial<EscalatableAlarm> = {}): EscalatableAlarm => ({
  priority: 'high',
  state: 'unacked',
  raisedAtMs: R,
  escalationStepsSent: [],
  ...over,
});

describe('escalation steps due', () => {
  it('nothing before the first step; step 1 at exactly 5 min', () => {
    expect(dueEscalations(alarm(), rules, R + 5 * MIN - 1)).toEqual([]);
    expect(dueEscalations(alarm(), rules, R + 5 * MIN)).toEqual([
      { stepIndex: 0, afterMinutes: 5, notify: 'on-shift-engineer', dueAtMs: R + 300_000 },
    ]);
  });
  it('one message per step: a sent step is not repeated', () => {
    expect(dueEscalations(alarm({ escalationStepsSent: [0] }), rules, R + 10 * MIN)).toEqual([]);
    expect(dueEscalations(alarm({ escalationStepsSent: [0] }), rules, R + 15 * MIN)).toEqual([
      { stepIndex: 1, afterMinutes: 15, notify: 'lab-manager', dueAtMs: R + 900_000 },
    ]);
    expect(dueEscalations(alarm({ escalationStepsSent: [0, 1] }), rules, R + 24 * 60 * MIN)).toEqual([]);
  });
  it('a late caller gets every overdue unsent step, in order', () => {
    expect(dueEscalations(alarm(), rules, R + 20 * MIN).map((d) => d.stepIndex)).toEqual([0, 1]);
  });
  it('a returned-to-normal alarm nobody acknowledged still escalates', () => {
    expect(dueEscalations(alarm({ state: 'rtn-unacked' }), rules, R + 5 * MIN)).toHaveLength(1);
  });
  it('none once acknowledged, cleared-and-acknowledged, or not annunciated', () => {
    const escalates: Record<AlarmState, boolean> = {
      normal: false,
      unacked: true,
      acked: false,
      'rtn-unacked': true,
      shelved: false,
      suppressed: false,
      'out-of-service': false,
    };
    for (const state of ALARM_STATES) {
      expect(canEscalate(state), state).toBe(escalates[state]);
      expect(dueEscalations(alarm({ state }), rules, R + 60 * MIN).length > 0, state).toBe(escalates[state]);
    }
  });
  it('priorities without steps never escalate', () => {
    expect(dueEscalations(alarm({ priority: 'low' }), rules, R + 1e9)).toEqual([]);
    expect(dueEscalations(alarm({ priority: 'medium' }), rules, R + 59 * MIN)).toEqual([]);
    expect(dueEscalations(alarm({ priority: 'medium' }), rules, R + 60 * MIN)).toHaveLength(1);
  });
  it('next escalation time for a scheduler', () => {
    expect(nextEscalationAtMs(alarm(), rules)).toBe(R + 5 * MIN);
    expect(nextEscalationAtMs(alarm({ escalationStepsSent: [0] }), rules)).toBe(R + 15 * MIN);
    expect(nextEscalationAtMs(alarm({ escalationStepsSent: [0, 1] }), rules)).toBeNull();
    expect(nextEscalationAtMs(alarm({ state: 'acked' }), rules)).toBeNull();
    expect(nextEscalationAtMs(alarm({ priority: 'low' }), rules)).toBeNull();
  });
  it('the shared rule schema accepts the example and refuses steps out of order', () => {
    expect(EscalationRuleSchema.safeParse({ priority: 'high', steps: rules.high }).success).toBe(true);
    expect(
      EscalationRuleSchema.safeParse({
        priority: 'high',
        steps: [
          { afterMinutes: 15, notify: 'lab-manager' },
          { afterMinutes: 5, notify: 'on-shift-engineer' },
        ],
      }).success,
    ).toBe(false);
    expect(EscalationRuleSchema.safeParse({ priority: 'high', steps: [{ afterMinutes: 0, notify: 'x' }] }).success).toBe(false);
    expect(EscalationRuleSchema.safeParse({ priority: 'urgent', steps: [] }).success).toBe(false);
  });
});
