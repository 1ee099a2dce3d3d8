/**
 * Escalation of unacknowledged alarms: which notification steps are due now.
 *
 * Escalation is Coatrail's own feature, not a requirement of ANSI/ISA-18.2-2016 or
 * IEC 62682:2014; it serves the standards' aim that every alarm gets a timely operator
 * response (the "alarm response" and "time to respond" ideas behind alarm prioritization).
 * The per-priority step lists are validated by `EscalationRuleSchema` in `lib/shared/alarms.ts`.
 *
 * Rules:
 * - An alarm escalates only while it waits for acknowledgement: state `unacked` (active,
 *   unacknowledged) or `rtn-unacked` (cleared but never acknowledged — nobody has seen it, so
 *   we keep telling someone). Once acknowledged (`acked`), cleared-and-acknowledged (`normal`),
 *   or not annunciated (`shelved`, `suppressed`, `out-of-service`), nothing is due.
 * - Step `i` of the alarm's priority is due when `nowMs ≥ raisedAtMs + afterMinutes × 60 000`
 *   and `i` is not in `escalationStepsSent`. Each step is sent at most once per alarm; if the
 *   caller was late, every overdue unsent step is returned, in step order.
 */
import type { AlarmPriority, EscalationStep } from '../../shared/alarms';
import type { AlarmState } from './state';

export type { EscalationStep };

/** What escalation needs to know about one alarm. */
export interface EscalatableAlarm {
  priority: AlarmPriority;
  state: AlarmState;
  /** When the alarm was raised (activated), epoch ms. */
  raisedAtMs: number;
  /** Indexes (0-based, into the priority's step list) already sent for this alarm. */
  escalationStepsSent: readonly number[];
}

/** Escalation steps per priority; a priority missing or with no steps never escalates. */
export type EscalationRules = Partial<Record<AlarmPriority, readonly EscalationStep[]>>;

/** One notification to send now. */
export interface DueEscalation {
  /** Index of the step in the priority's list (record it in `escalationStepsSent` once sent). */
  stepIndex: number;
  afterMinutes: number;
  notify: string;
  /** `raisedAtMs + afterMinutes × 60 000`. */
  dueAtMs: number;
}

/** True when the state still waits for acknowledgement and so may escalate (`unacked`, `rtn-unacked`). */
export function canEscalate(state: AlarmState): boolean {
  return state === 'unacked' || state === 'rtn-unacked';
}

/**
 * The escalation steps due at `nowMs` that have not been sent yet (see the module comment).
 * Pure: the caller sends them and records their `stepIndex` in `escalationStepsSent`.
 */
export function dueEscalations(alarm: EscalatableAlarm, rules: EscalationRules, nowMs: number): DueEscalation[] {
  if (!canEscalate(alarm.state)) return [];
  const steps = rules[alarm.priority] ?? [];
  const sent = new Set(alarm.escalationStepsSent);
  const due: DueEscalation[] = [];
  steps.forEach((s, stepIndex) => {
    const dueAtMs = alarm.raisedAtMs + s.afterMinutes * 60_000;
    if (nowMs >= dueAtMs && !sent.has(stepIndex)) {
      due.push({ stepIndex, afterMinutes: s.afterMinutes, notify: s.notify, dueAtMs });
    }
  });
  return due;
}

/**
 * When the next unsent step of this alarm falls due (epoch ms), or `null` when none is left or
 * the alarm does not escalate — lets a scheduler sleep until then instead of polling.
 */
export function nextEscalationAtMs(alarm: EscalatableAlarm, rules: EscalationRules): number | null {
  if (!canEscalate(alarm.state)) return null;
  const sent = new Set(alarm.escalationStepsSent);
  let next: number | null = null;
  (rules[alarm.priority] ?? []).forEach((s, i) => {
    if (sent.has(i)) return;
    const at = alarm.raisedAtMs + s.afterMinutes * 60_000;
    if (next === null || at < next) next = at;
  });
  return next;
}
