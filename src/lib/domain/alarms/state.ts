/**
 * The alarm state model of ANSI/ISA-18.2-2016 and IEC 62682:2014 ("alarm states" / alarm
 * state transition diagram) as one pure transition function.
 *
 * The standard's states, in our identifiers:
 *
 * | id               | ISA-18.2 / IEC 62682 state                       | annunciated |
 * |------------------|--------------------------------------------------|-------------|
 * | `normal`         | normal                                           | no          |
 * | `unacked`        | unacknowledged alarm (active, unacknowledged)    | yes         |
 * | `acked`          | acknowledged alarm (active, acknowledged)        | yes         |
 * | `rtn-unacked`    | returned to normal, unacknowledged               | yes         |
 * | `shelved`        | shelved                                          | no          |
 * | `suppressed`     | suppressed by design                             | no          |
 * | `out-of-service` | out of service                                   | no          |
 *
 * The record keeps the process condition (`active`) separately from the state, so that while
 * an alarm is shelved, suppressed or out of service the condition is still tracked, and on
 * unshelving / unsuppressing / returning to service it lands where the standard's diagram puts
 * it: an active condition comes back as `unacked` (the operator must see it), an inactive one
 * as `normal`. An unacknowledged return-to-normal that was shelved is therefore not brought
 * back on unshelving (its condition has gone).
 *
 * Who may do what is Coatrail's own decision (the standard leaves it to the alarm philosophy):
 * - `ack`: operator and engineer. Quality, viewer and admin are refused: quality staff and
 *   viewers do not run the floor, and admin administers users and devices, kept apart from
 *   process operation (separation of duties; the same rule as `PERMISSIONS` in
 *   `lib/shared/roles.ts`, which this module reads).
 * - `shelve`, `unshelve`, `remove-from-service`, `return-to-service`: engineer only (product
 *   brief §2). ANSI/ISA-18.2 describes shelving as typically operator-initiated (from memory);
 *   our alarm philosophy reserves it for the process engineer.
 * - `activate`, `clear`, `suppress`, `unsuppress`, `shelf-expired`: `system` only (the ingest
 *   worker); no person can fake the process condition.
 *
 * Checks run in this order: role, then whether the event applies to the state, then the
 * event's own fields (comment, minutes, reason). Operator and engineer commands that would
 * change nothing are refused with a reason ("already acknowledged"); system events that would
 * change nothing are accepted with `changed: false`, so the ingest worker can re-send them.
 *
 * Suppression by design does not override a shelf or an out-of-service state (a `suppress`
 * there is accepted and changes nothing); the caller re-evaluates its suppression condition
 * when the alarm comes back and sends `suppress` again if it still holds.
 */
import {
  ALARM_STATES,
  ALARM_REASON_MIN,
  ALARM_TEXT_MAX,
  SHELVE_MINUTES_MAX,
  SHELVE_MINUTES_MIN,
  type AlarmActor,
  type AlarmState,
} from '../../shared/alarms';
import { PERMISSIONS } from '../../shared/roles';

export { ALARM_STATES };
export type { AlarmActor, AlarmState };

/** The events of the model (see the module comment for who may send each). */
export const ALARM_EVENTS = [
  'activate',
  'clear',
  'ack',
  'shelve',
  'unshelve',
  'shelf-expired',
  'suppress',
  'unsuppress',
  'remove-from-service',
  'return-to-service',
] as const;
/** Name of one alarm event. */
export type AlarmEventType = (typeof ALARM_EVENTS)[number];

/** An alarm event with its fields. */
export type AlarmEvent =
  | { type: 'activate' }
  | { type: 'clear' }
  | { type: 'ack'; comment: string }
  | { type: 'shelve'; minutes: number; reason: string }
  | { type: 'unshelve' }
  | { type: 'shelf-expired' }
  | { type: 'suppress' }
  | { type: 'unsuppress' }
  | { type: 'remove-from-service'; reason: string }
  | { type: 'return-to-service'; reason: string };

/**
 * The part of an alarm the state model reads and writes. `active` is the process condition
 * (abnormal = true) and is meaningful in every state; `shelvedUntilMs` (epoch ms) is set
 * while `state` is `shelved` and `null` otherwise. Consistency expected of callers:
 * `normal`/`rtn-unacked` ⇒ `!active`, `unacked`/`acked` ⇒ `active`.
 */
export interface AlarmRecord {
  state: AlarmState;
  active: boolean;
  shelvedUntilMs?: number | null;
}

/** Context of a transition: the time (epoch ms, supplied by the caller — no clock here) and who acts. */
export interface TransitionContext {
  nowMs: number;
  role: AlarmActor;
}

/** Result of {@link transition}: the next record, or a refusal in plain words. */
export type TransitionResult<A extends AlarmRecord> = { ok: true; alarm: A; changed: boolean } | { ok: false; reason: string };

/**
 * Which actors may send each event. Person-driven events take their roles from the project's
 * one permission table (`PERMISSIONS` in `lib/shared/roles.ts`: `alarm.ack`, `alarm.shelve`,
 * `alarm.configure`); process-driven events belong to `system`. ANSI/ISA-18.2 leaves role
 * assignment to the site's alarm philosophy.
 */
export const EVENT_ROLES: Readonly<Record<AlarmEventType, readonly AlarmActor[]>> = {
  activate: ['system'],
  clear: ['system'],
  ack: PERMISSIONS['alarm.ack'],
  shelve: PERMISSIONS['alarm.shelve'],
  unshelve: PERMISSIONS['alarm.shelve'],
  'shelf-expired': ['system'],
  suppress: ['system'],
  unsuppress: ['system'],
  'remove-from-service': PERMISSIONS['alarm.configure'],
  'return-to-service': PERMISSIONS['alarm.configure'],
};

const ACTOR_NOUN: Record<AlarmActor, string> = {
  operator: 'an operator',
  engineer: 'an engineer',
  quality: 'a quality user',
  admin: 'an admin',
  viewer: 'a viewer',
  system: 'the system',
};

const EVENT_VERB: Record<AlarmEventType, string> = {
  activate: 'report an alarm condition',
  clear: 'report a return to normal',
  ack: 'acknowledge alarms',
  shelve: 'shelve alarms',
  unshelve: 'unshelve alarms',
  'shelf-expired': 'end a shelf by expiry',
  suppress: 'suppress alarms by design',
  unsuppress: 'end suppression by design',
  'remove-from-service': 'take alarms out of service',
  'return-to-service': 'return alarms to service',
};

/**
 * Plain English labels of the states, for screens (our own wording). For a shelved alarm
 * prefer {@link stateLabel}, which adds the end of the shelf.
 */
export const STATE_LABELS: Readonly<Record<AlarmState, string>> = {
  normal: 'Normal',
  unacked: 'Needs acknowledgement',
  acked: 'Acknowledged, still active',
  'rtn-unacked': 'Cleared, not yet acknowledged',
  shelved: 'Shelved',
  suppressed: 'Suppressed by design',
  'out-of-service': 'Out of service',
};

/**
 * Label of an alarm's state; a shelved alarm reads "Shelved until <time>", with the time
 * formatted by the caller (no locale or clock here).
 */
export function stateLabel(alarm: AlarmRecord, formatMs: (epochMs: number) => string): string {
  if (alarm.state === 'shelved' && typeof alarm.shelvedUntilMs === 'number') {
    return `Shelved until ${formatMs(alarm.shelvedUntilMs)}`;
  }
  return STATE_LABELS[alarm.state];
}

/**
 * True when the state is shown to the operator as an alarm (alarm list, banner, horn):
 * `unacked`, `acked` and `rtn-unacked`. Shelved, suppressed-by-design and out-of-service
 * alarms are not annunciated (ANSI/ISA-18.2 / IEC 62682: these states remove the alarm from
 * annunciation while its condition is still tracked).
 */
export function isAnnunciated(state: AlarmState): boolean {
  return state === 'unacked' || state === 'acked' || state === 'rtn-unacked';
}

/** True when the state waits for an operator's acknowledgement (`unacked`, `rtn-unacked`). */
export function needsAcknowledgement(state: AlarmState): boolean {
  return state === 'unacked' || state === 'rtn-unacked';
}

const HELD: readonly AlarmState[] = ['shelved', 'suppressed', 'out-of-service'];

/**
 * Apply one event to an alarm record (ANSI/ISA-18.2 / IEC 62682 alarm state transitions).
 *
 * - `activate` (condition goes abnormal): normal → unacked; rtn-unacked → unacked (the alarm
 *   re-annunciates); unacked/acked unchanged; shelved/suppressed/out-of-service stay put with
 *   `active = true` (no annunciation).
 * - `clear` (condition returns to normal): unacked → rtn-unacked; acked → normal; held states
 *   stay put with `active = false`.
 * - `ack` (comment 1–500 characters after trimming): unacked → acked; rtn-unacked → normal.
 * - `shelve` (whole minutes 1–1440, reason ≥ 3 characters): from normal, unacked, acked or
 *   rtn-unacked to shelved until `nowMs + minutes × 60 000`.
 * - `unshelve`, or `shelf-expired` at or after the shelf's end: shelved → unacked if the
 *   condition is active, else normal. A shelved record without an end time counts as expired.
 * - `suppress`: the four alarm states → suppressed; `unsuppress`: suppressed → unacked/normal.
 * - `remove-from-service` (reason): any state but out-of-service → out-of-service (a shelf is
 *   dropped); `return-to-service` (reason): out-of-service → unacked/normal.
 *
 * Returns `{ok: true, alarm, changed}` with a new object (the input is not modified) or
 * `{ok: false, reason}`.
 */
export function transition<A extends AlarmRecord>(alarm: A, event: AlarmEvent, ctx: TransitionContext): TransitionResult<A> {
  if (!EVENT_ROLES[event.type].includes(ctx.role)) {
    return refuse(`${ACTOR_NOUN[ctx.role]} cannot ${EVENT_VERB[event.type]}`);
  }
  const s = alarm.state;
  const held = HELD.includes(s);
  const back: AlarmState = alarm.active ? 'unacked' : 'normal';

  switch (event.type) {
    case 'activate':
      if (s === 'normal' || s === 'rtn-unacked') return next(alarm, { state: 'unacked', active: true });
      return next(alarm, { active: true });

    case 'clear':
      if (s === 'unacked') return next(alarm, { state: 'rtn-unacked', active: false });
      if (s === 'acked') return next(alarm, { state: 'normal', active: false });
      return next(alarm, { active: false });

    case 'ack': {
      if (s === 'acked') return refuse('already acknowledged');
      if (s === 'normal') return refuse('nothing to acknowledge: the alarm is normal');
      if (held) return refuse(`cannot acknowledge: the alarm is ${STATE_LABELS[s].toLowerCase()}`);
      const problem = textProblem(event.comment, 1, 'ack needs a comment');
      if (problem) return refuse(problem);
      return next(alarm, { state: s === 'unacked' ? 'acked' : 'normal' });
    }

    case 'shelve': {
      if (s === 'shelved') return refuse('already shelved; unshelve it first');
      if (held) return refuse(`cannot shelve: the alarm is ${STATE_LABELS[s].toLowerCase()}`);
      const m = event.minutes;
      if (!Number.isInteger(m) || m < SHELVE_MINUTES_MIN || m > SHELVE_MINUTES_MAX) {
        return refuse(`shelve for whole minutes from ${SHELVE_MINUTES_MIN} to ${SHELVE_MINUTES_MAX}`);
      }
      const problem = textProblem(event.reason, ALARM_REASON_MIN, 'shelving needs a reason');
      if (problem) return refuse(problem);
      return next(alarm, { state: 'shelved', shelvedUntilMs: ctx.nowMs + m * 60_000 });
    }

    case 'unshelve':
      if (s !== 'shelved') return refuse('the alarm is not shelved');
      return next(alarm, { state: back, shelvedUntilMs: null });

    case 'shelf-expired': {
      if (s !== 'shelved') return refuse('the alarm is not shelved');
      const until = alarm.shelvedUntilMs;
      if (typeof until === 'number' && ctx.nowMs < until) return refuse('the shelf has not expired yet');
      return next(alarm, { state: back, shelvedUntilMs: null });
    }

    case 'suppress':
      if (held) return next(alarm, {});
      return next(alarm, { state: 'suppressed' });

    case 'unsuppress':
      if (s !== 'suppressed') return next(alarm, {});
      return next(alarm, { state: back });

    case 'remove-from-service': {
      if (s === 'out-of-service') return refuse('already out of service');
      const problem = textProblem(event.reason, ALARM_REASON_MIN, 'taking an alarm out of service needs a reason');
      if (problem) return refuse(problem);
      return next(alarm, { state: 'out-of-service', shelvedUntilMs: null });
    }

    case 'return-to-service': {
      if (s !== 'out-of-service') return refuse('the alarm is not out of service');
      const problem = textProblem(event.reason, ALARM_REASON_MIN, 'returning an alarm to service needs a reason');
      if (problem) return refuse(problem);
      return next(alarm, { state: back });
    }
  }
}

function refuse(reason: string): { ok: false; reason: string } {
  return { ok: false, reason };
}

function next<A extends AlarmRecord>(alarm: A, patch: Partial<AlarmRecord>): TransitionResult<A> {
  const updated: A = { ...alarm, ...patch };
  const changed =
    updated.state !== alarm.state ||
    updated.active !== alarm.active ||
    (updated.shelvedUntilMs ?? null) !== (alarm.shelvedUntilMs ?? null);
  return { ok: true, alarm: updated, changed };
}

/** Null when `text` is acceptable, else the refusal. */
function textProblem(text: unknown, min: number, missing: string): string | null {
  const t = typeof text === 'string' ? text.trim() : '';
  if (t.length === 0) return missing;
  if (t.length < min) return `${missing} of at least ${min} characters`;
  if (t.length > ALARM_TEXT_MAX) return `at most ${ALARM_TEXT_MAX} characters`;
  return null;
}
