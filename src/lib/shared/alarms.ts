/**
 * Alarm vocabulary and request schemas shared by the browser, the API and the ingest worker.
 *
 * The alarm states and the ideas of shelving, suppression by design, out-of-service, alarm
 * priority, deadband and on/off delay are those of ANSI/ISA-18.2-2016 "Management of Alarm
 * Systems for the Process Industries" and its international twin IEC 62682:2014 (alarm states,
 * alarm prioritization, alarm shelving and alarm response sections; clause numbers are not
 * quoted here). The wording of labels and meanings is our own.
 *
 * Nothing here is a safety system: Coatrail's alarms are advisory (product brief §8).
 */
import { z } from 'zod';
import { ROLES, type Role } from './roles';

// ---------------------------------------------------------------------------------------------
// Vocabulary
// ---------------------------------------------------------------------------------------------

/**
 * The alarm states of the ANSI/ISA-18.2 / IEC 62682 alarm state model, in our identifiers:
 * `normal`, `unacked` (active, unacknowledged), `acked` (active, acknowledged), `rtn-unacked`
 * (returned to normal, unacknowledged), `shelved`, `suppressed` (suppressed by design) and
 * `out-of-service`. Transitions live in `lib/domain/alarms/state.ts`.
 */
export const ALARM_STATES = ['normal', 'unacked', 'acked', 'rtn-unacked', 'shelved', 'suppressed', 'out-of-service'] as const;

/** One alarm state (see {@link ALARM_STATES}); validates e.g. `GET /api/v1/alarms?state=…`. */
export const AlarmStateSchema = z.enum(ALARM_STATES);
/** One alarm state. */
export type AlarmState = z.infer<typeof AlarmStateSchema>;

/** Alarm priorities, most urgent first (ANSI/ISA-18.2 alarm prioritization: few priorities, each with a defined response). */
export const ALARM_PRIORITIES = ['high', 'medium', 'low'] as const;

/**
 * Alarm priority. ANSI/ISA-18.2 asks that each priority have a documented meaning based on
 * the consequence of not responding and the time available to respond; ours is:
 * - `high`: act within minutes — product is at risk now (e.g. an oven below cure temperature
 *   mid-soak, the withdrawal speed outside its window during a dip stroke);
 * - `medium`: act this shift — the process is drifting and will make bad product if left
 *   (e.g. bath viscosity creeping toward its upper limit);
 * - `low`: awareness — no product at risk yet (e.g. filter change due).
 */
export const AlarmPrioritySchema = z.enum(ALARM_PRIORITIES);
/** Alarm priority (see {@link AlarmPrioritySchema}). */
export type AlarmPriority = z.infer<typeof AlarmPrioritySchema>;

/** The documented meaning of each priority, in plain words for screens and the alarm philosophy page. */
export const PRIORITY_MEANINGS: Readonly<Record<AlarmPriority, string>> = {
  high: 'Act within minutes: product is at risk now',
  medium: 'Act this shift: the process is drifting',
  low: 'For awareness: no product at risk yet',
};

/**
 * Who performs an alarm event: one of the product's roles (`lib/shared/roles.ts`, product
 * brief §2) or `system`, the actor for process-driven events (the ingest worker reporting the
 * condition, suppression by design, shelf expiry).
 */
export const ALARM_ACTORS = [...ROLES, 'system'] as const;
/** Who performs an alarm event (see {@link ALARM_ACTORS}). */
export type AlarmActor = Role | 'system';

/** Longest acknowledgement comment or reason, in characters. */
export const ALARM_TEXT_MAX = 500;
/** Shortest shelving / out-of-service reason, in characters (after trimming). */
export const ALARM_REASON_MIN = 3;
/** Shortest shelf, in minutes. */
export const SHELVE_MINUTES_MIN = 1;
/**
 * Longest shelf, in minutes (24 h). ANSI/ISA-18.2 expects shelving to be time-limited so a
 * shelved alarm cannot be forgotten; the 24 h ceiling is our own choice.
 */
export const SHELVE_MINUTES_MAX = 1440;
/** Most alarms one bulk acknowledgement may cover. */
export const BULK_ACK_MAX = 200;

// ---------------------------------------------------------------------------------------------
// Requests
// ---------------------------------------------------------------------------------------------

const commentField = z
  .string()
  .trim()
  .min(1, 'an acknowledgement needs a comment')
  .max(ALARM_TEXT_MAX, `at most ${ALARM_TEXT_MAX} characters`);

const reasonField = z
  .string()
  .trim()
  .min(ALARM_REASON_MIN, `give a reason of at least ${ALARM_REASON_MIN} characters`)
  .max(ALARM_TEXT_MAX, `at most ${ALARM_TEXT_MAX} characters`);

/**
 * Body of `POST /api/v1/alarms/{id}/ack`: the operator's comment, 1–500 characters after
 * trimming. ANSI/ISA-18.2 acknowledgement is the operator's confirmation that the alarm was
 * seen; Coatrail asks for a comment so the audit trail says what was done.
 */
export const AckAlarmSchema = z.object({ comment: commentField });
/** Acknowledgement request. */
export type AckAlarm = z.infer<typeof AckAlarmSchema>;

/**
 * Acknowledge several alarms with one comment: 1–200 distinct positive integer alarm ids.
 * Each alarm is still acknowledged (and audited) individually.
 */
export const BulkAckSchema = z.object({
  ids: z
    .array(z.number().int().positive())
    .min(1, 'choose at least one alarm')
    .max(BULK_ACK_MAX, `at most ${BULK_ACK_MAX} alarms at once`)
    .refine((ids) => new Set(ids).size === ids.length, 'each alarm may be listed only once'),
  comment: commentField,
});
/** Bulk acknowledgement request. */
export type BulkAck = z.infer<typeof BulkAckSchema>;

/**
 * Body of `POST /api/v1/alarms/{id}/shelve` (engineer): shelf length in whole minutes
 * 1–1440 and a reason of 3–500 characters. Shelving (ANSI/ISA-18.2 "shelved" state) is a
 * temporary, time-limited, operator-initiated removal from annunciation; the shelf ends at
 * now + minutes.
 */
export const ShelveAlarmSchema = z.object({
  minutes: z
    .number()
    .int('whole minutes')
    .min(SHELVE_MINUTES_MIN, `at least ${SHELVE_MINUTES_MIN} minute`)
    .max(SHELVE_MINUTES_MAX, `at most ${SHELVE_MINUTES_MAX} minutes (24 h)`),
  reason: reasonField,
});
/** Shelving request. */
export type ShelveAlarm = z.infer<typeof ShelveAlarmSchema>;

/**
 * Removing an alarm from service, or returning it (engineer): a reason of 3–500 characters.
 * "Out of service" in ANSI/ISA-18.2 is the state of an alarm taken out of operation for
 * maintenance under an administrative procedure (e.g. a thermocouple being replaced).
 */
export const OutOfServiceSchema = z.object({ reason: reasonField });
/** Out-of-service / return-to-service request. */
export type OutOfService = z.infer<typeof OutOfServiceSchema>;

/** Longest on-delay or off-delay accepted, in ms (1 h; our own bound). */
export const LIMIT_DELAY_MAX_MS = 3_600_000;

// zod v4 numbers already refuse NaN and ±Infinity.
const finite = z.number();

/**
 * Settings of a high/low process-window alarm (see `lib/domain/alarms/limit-detector.ts`):
 * - `high`, `low`: alarm limits in the channel's unit; at least one, and `low < high`;
 * - `deadband` (same unit, ≥ 0): the alarm clears only once the value is back inside the limit
 *   by more than this (ANSI/ISA-18.2 alarm deadband);
 * - `onDelayMs`, `offDelayMs` (0–3 600 000 ms): how long the abnormal / cleared condition must
 *   persist before the alarm activates / clears (ANSI/ISA-18.2 on-delay and off-delay);
 * - `priority`.
 */
export const LimitAlarmConfigSchema = z
  .object({
    high: finite.optional(),
    low: finite.optional(),
    deadband: finite.min(0, 'deadband cannot be negative'),
    onDelayMs: z.number().int().min(0).max(LIMIT_DELAY_MAX_MS),
    offDelayMs: z.number().int().min(0).max(LIMIT_DELAY_MAX_MS),
    priority: AlarmPrioritySchema,
  })
  .refine((c) => c.high !== undefined || c.low !== undefined, {
    message: 'set a high limit, a low limit or both',
    path: ['high'],
  })
  .refine((c) => c.high === undefined || c.low === undefined || c.low < c.high, {
    message: 'the low limit must be below the high limit',
    path: ['low'],
  });
/** High/low limit alarm settings. */
export type LimitAlarmConfig = z.infer<typeof LimitAlarmConfigSchema>;

/**
 * One escalation step: when an alarm is still unacknowledged `afterMinutes` (1–10 080, i.e. up
 * to a week) after it was raised, notify the recipient group `notify` (a key such as
 * `on-shift-engineer` or `lab-manager`; delivery is configured elsewhere). Escalation of
 * unacknowledged alarms is our own feature, not a requirement of ANSI/ISA-18.2.
 */
export const EscalationStepSchema = z.object({
  afterMinutes: z.number().int().min(1).max(10_080),
  notify: z
    .string()
    .trim()
    .min(1)
    .max(100)
    .regex(/^[a-z0-9][a-z0-9-]*$/, 'lower-case letters, digits and hyphens'),
});
/** One escalation step. */
export type EscalationStep = z.infer<typeof EscalationStepSchema>;

/**
 * The escalation rule for one priority: up to 10 steps with strictly increasing `afterMinutes`.
 * A priority without a rule never escalates.
 */
export const EscalationRuleSchema = z.object({
  priority: AlarmPrioritySchema,
  steps: z
    .array(EscalationStepSchema)
    .max(10)
    .refine(
      (steps) => steps.every((s, i) => i === 0 || s.afterMinutes > (steps[i - 1]?.afterMinutes ?? 0)),
      'steps must come in order of strictly increasing minutes',
    ),
});
/** Escalation rule for one priority. */
export type EscalationRule = z.infer<typeof EscalationRuleSchema>;
