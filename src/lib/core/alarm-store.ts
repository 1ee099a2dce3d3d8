/**
 * The alarm store: raising, clearing and transitioning alarms in PostgreSQL. Worker-safe —
 * takes the process's Sequelize instance or a transaction of it, imports no Astro env — so the
 * ingest worker (limit, stale, device and system sources), the web endpoints (acknowledge,
 * shelve, out of service) and other helpers (SPC and cure verdicts) all go through the same code.
 *
 * Records go through the `Alarm` / `AlarmEvent` models. Raise and clear stay one guarded SQL
 * statement each (`sequelize.query` with bind parameters): they run per judged sample in the
 * worker, and one round trip per raise is what keeps `npm run bench:alarms` at its figures;
 * the queue list and the health log are multi-join report queries and stay SQL too.
 *
 * Every state change goes through the domain's `transition` (ANSI/ISA-18.2 / IEC 62682 alarm
 * states, `lib/domain/alarms/state.ts`) and writes one `alarm_events` row. A source has at
 * most one open alarm (any state but `normal`); a raise on a source with an open alarm updates
 * that row instead of duplicating it and counts the activation (chattering shows as a rising
 * `activation_count` and repeated `activate` events).
 *
 * The store does not publish live events; callers publish `alarms` with {@link liveAlarmPayload}.
 */
import { Op } from 'sequelize';
import { Alarm, AlarmEvent as AlarmEventRow, Asset, User } from '../../../db/models/index.ts';
import { transition, type AlarmEvent, type AlarmRecord, type AlarmActor, type AlarmState } from '../domain/alarms/state.ts';
import type { AlarmPriority } from '../shared/alarms.ts';
import type { AlarmSourceKind, AlarmView, AlarmEventView } from '../shared/alarm-views.ts';
import { characteristicAlarmConfig } from './alarm-config-store.ts';
import { execute, inTransaction, isDb, select, txOpt, type AnyDb, type Db } from './db.ts';

export interface RaiseAlarmInput {
  sourceKind: AlarmSourceKind;
  /** Stable id of the source, e.g. 'channel:12:high', 'char:3', 'load:42', 'device:5'. */
  sourceKey: string;
  /** Plain words, e.g. 'Line 1 bath viscosity'. */
  sourceLabel: string;
  assetId?: number | null;
  channelId?: number | null;
  characteristicId?: number | null;
  loadId?: number | null;
  priority: AlarmPriority;
  /** e.g. 'Viscosity 14.2 mm²/s above the window high 13.0 mm²/s'. */
  message: string;
  value?: number | null;
  limit?: number | null;
  atMs: number;
}

type Queryable = AnyDb;

const COLUMNS = `a.id, a.source_kind, a.source_key, a.source_label, a.asset_id, a.channel_id, a.characteristic_id,
  a.load_id, a.priority, a.message, a.value, a.limit_value, a.state, a.active, a.raised_at, a.last_activated_at,
  a.cleared_at, a.acked_at, a.acked_by, a.shelved_until, a.escalation_steps_sent, a.activation_count, a.updated_at,
  u.display_name as acked_by_name, ast.name as asset_name`;
const FROM = `alarms a left join users u on u.id = a.acked_by left join assets ast on ast.id = a.asset_id`;

interface AlarmRow {
  id: number;
  source_kind: AlarmSourceKind;
  source_key: string;
  source_label: string;
  asset_id: number | null;
  channel_id: number | null;
  characteristic_id: number | null;
  load_id: number | null;
  priority: AlarmPriority;
  message: string;
  value: number | null;
  limit_value: number | null;
  state: AlarmState;
  active: boolean;
  raised_at: Date;
  last_activated_at: Date;
  cleared_at: Date | null;
  acked_at: Date | null;
  acked_by: number | null;
  shelved_until: Date | null;
  escalation_steps_sent: number[];
  activation_count: number;
  updated_at: Date;
  acked_by_name: string | null;
  asset_name: string | null;
}

const ms = (d: Date | null): number | null => (d ? d.getTime() : null);

function toView(r: AlarmRow): AlarmView {
  return {
    id: r.id,
    sourceKind: r.source_kind,
    sourceKey: r.source_key,
    sourceLabel: r.source_label,
    assetId: r.asset_id,
    assetName: r.asset_name,
    channelId: r.channel_id,
    characteristicId: r.characteristic_id,
    loadId: r.load_id,
    priority: r.priority,
    message: r.message,
    value: r.value,
    limit: r.limit_value,
    state: r.state,
    active: r.active,
    raisedAtMs: r.raised_at.getTime(),
    lastActivatedAtMs: r.last_activated_at.getTime(),
    clearedAtMs: ms(r.cleared_at),
    ackedAtMs: ms(r.acked_at),
    ackedBy: r.acked_by_name,
    shelvedUntilMs: ms(r.shelved_until),
    escalationStepsSent: r.escalation_steps_sent ?? [],
    activationCount: r.activation_count,
    updatedAtMs: r.updated_at.getTime(),
  };
}

/** The payload of a live `alarms` event for one alarm (the whole view; `id`, `state`, `priority` first). */
export function liveAlarmPayload(alarm: AlarmView): AlarmView {
  return alarm;
}

async function selectOne(q: Queryable, where: string, params: unknown[]): Promise<AlarmRow | null> {
  const rows = await select<AlarmRow>(q, `select ${COLUMNS} from ${FROM} where ${where}`, params);
  return rows[0] ?? null;
}

/** The joins a view needs (who acknowledged, the asset's name). */
const VIEW_INCLUDE = () => [
  { model: User, as: 'acker', attributes: ['displayName'], required: false },
  { model: Asset, attributes: ['name'], required: false },
];

type AlarmWithJoins = Alarm & { acker?: { displayName: string } | null; Asset?: { name: string } | null };

function viewOfModel(a: AlarmWithJoins): AlarmView {
  return {
    id: a.id,
    sourceKind: a.sourceKind as AlarmSourceKind,
    sourceKey: a.sourceKey,
    sourceLabel: a.sourceLabel,
    assetId: a.assetId,
    assetName: a.Asset?.name ?? null,
    channelId: a.channelId,
    characteristicId: a.characteristicId,
    loadId: a.loadId,
    priority: a.priority as AlarmPriority,
    message: a.message,
    value: a.value,
    limit: a.limitValue,
    state: a.state as AlarmState,
    active: a.active,
    raisedAtMs: a.raisedAt.getTime(),
    lastActivatedAtMs: a.lastActivatedAt.getTime(),
    clearedAtMs: ms(a.clearedAt),
    ackedAtMs: ms(a.ackedAt),
    ackedBy: a.acker?.displayName ?? null,
    shelvedUntilMs: ms(a.shelvedUntil),
    escalationStepsSent: a.escalationStepsSent ?? [],
    activationCount: a.activationCount,
    updatedAtMs: a.updatedAt.getTime(),
  };
}

async function viewById(db: Db, id: number): Promise<AlarmView | null> {
  const a = await Alarm.findByPk(id, { include: VIEW_INCLUDE(), ...txOpt(db) });
  return a ? viewOfModel(a as AlarmWithJoins) : null;
}

const SYSTEM = { role: 'system' as const };

/** Select the view of the rows of a data-modifying CTE named `changed` (joins for names). */
const VIEW_OF_CHANGED = `select ${COLUMNS} from changed a left join users u on u.id = a.acked_by left join assets ast on ast.id = a.asset_id`;

/** The row's state as the domain's transition reads it, and the optimistic guard on it. */
const GUARD = `state = $2 and active = $3
  and date_trunc('milliseconds', shelved_until) is not distinct from to_timestamp($4::float8 / 1000.0)`;

/** What the state model reads of an open alarm, and its id: enough to compute and guard a transition. */
export interface OpenAlarmState {
  id: number;
  state: AlarmState;
  active: boolean;
  shelvedUntilMs: number | null;
}

/**
 * What a caller already knows about a source's open alarm (e.g. the worker, from the alarm it
 * got back last time): the alarm, or 'none' when the source has no open alarm. A stale hint
 * costs one extra read; a right one saves it.
 */
export type AlarmHint = OpenAlarmState | 'none';

function guardParams(o: OpenAlarmState): [AlarmState, boolean, number | null] {
  return [o.state, o.active, o.shelvedUntilMs];
}

async function readOpen(pool: Queryable, sourceKey: string): Promise<OpenAlarmState | null> {
  const rows = await select<{ id: number; state: AlarmState; active: boolean; shelved_until: Date | null }>(
    pool,
    `select id, state, active, shelved_until from alarms where source_key = $1 and state <> 'normal'`,
    [sourceKey],
  );
  const r = rows[0];
  return r ? { id: r.id, state: r.state, active: r.active, shelvedUntilMs: ms(r.shelved_until) } : null;
}

function fromHint(hint: AlarmHint | undefined): OpenAlarmState | null | undefined {
  if (hint === undefined) return undefined;
  if (hint === 'none' || hint.state === 'normal') return null;
  return hint;
}

function isUniqueViolation(e: unknown): boolean {
  return (e as { code?: string }).code === '23505';
}

/**
 * Report that a source's condition is abnormal. Creates an alarm (state `unacked`) when the
 * source has none open; otherwise applies `activate` to the open one: a returned-to-normal
 * unacknowledged alarm re-annunciates, a shelved / out-of-service one stays held but becomes
 * active, an already active one just takes the newer message, value and limit. A new
 * activation (inactive → active) increments `activation_count` and writes an event; an update
 * of an already active alarm writes none (no rows per sample).
 *
 * A raise that names a characteristic follows the engineer's settings for it
 * (`alarm_configs.characteristic_id`): their priority replaces the caller's, and when its
 * alarms are switched off nothing is raised and the answer is `{id: 0, created: false}`.
 */
export async function raiseAlarm(pool: Queryable, input: RaiseAlarmInput): Promise<{ id: number; created: boolean }> {
  const r = await raiseAlarmReturning(pool, input);
  return r ? { id: r.alarm.id, created: r.created } : { id: 0, created: false };
}

/**
 * {@link raiseAlarm}, returning the alarm as it now is (for the caller's live event) and
 * whether the raise changed its state or activation (false for a plain update of an active
 * alarm); null when the characteristic's alarms are switched off.
 *
 * Each write is one statement (the alarm row and its event together, atomically), guarded by
 * the state the domain's `transition` was computed from; if another process changed the alarm
 * in between, the statement touches nothing and the raise is computed again.
 */
export async function raiseAlarmReturning(
  pool: Queryable,
  raw: RaiseAlarmInput,
  hint?: AlarmHint,
): Promise<{ alarm: AlarmView; created: boolean; activated: boolean } | null> {
  let input = raw;
  if (raw.characteristicId != null) {
    const cfg = await characteristicAlarmConfig(pool, raw.characteristicId);
    if (cfg && !cfg.enabled) return null;
    if (cfg) input = { ...raw, priority: cfg.priority };
  }
  const hinted = fromHint(hint);
  for (let attempt = 0; attempt < 20; attempt++) {
    const open = attempt === 0 && hinted !== undefined ? hinted : await readOpen(pool, input.sourceKey);
    try {
      const out = open ? await reactivate(pool, open, input) : await insertNew(pool, input);
      if (out) return out;
    } catch (e) {
      // Two processes raising the same new source at once: the loser tries again and updates.
      if (!isUniqueViolation(e)) throw e;
    }
  }
  throw new Error(`alarm store: could not raise ${input.sourceKey} (kept changing under us)`);
}

async function insertNew(
  pool: Queryable,
  input: RaiseAlarmInput,
): Promise<{ alarm: AlarmView; created: boolean; activated: boolean }> {
  const t = transition<AlarmRecord>({ state: 'normal', active: false }, { type: 'activate' }, { nowMs: input.atMs, ...SYSTEM });
  if (!t.ok) throw new Error(`alarm store: ${t.reason}`);
  const rows = await select<AlarmRow>(
    pool,
    `with changed as (
       insert into alarms (source_kind, source_key, source_label, asset_id, channel_id, characteristic_id, load_id,
         priority, message, value, limit_value, state, active, raised_at, last_activated_at)
       values ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11,$12,$13, to_timestamp($14::float8 / 1000.0), to_timestamp($14::float8 / 1000.0))
       returning *
     ), ev as (
       insert into alarm_events (alarm_id, at, event, from_state, to_state, active, comment)
       select id, raised_at, 'activate', 'normal', state, true, message from changed
     )
     ${VIEW_OF_CHANGED}`,
    [
      input.sourceKind,
      input.sourceKey,
      input.sourceLabel,
      input.assetId ?? null,
      input.channelId ?? null,
      input.characteristicId ?? null,
      input.loadId ?? null,
      input.priority,
      input.message,
      finiteOrNull(input.value),
      finiteOrNull(input.limit),
      t.alarm.state,
      t.alarm.active,
      input.atMs,
    ],
  );
  return { alarm: toView(rows[0]!), created: true, activated: true };
}

async function reactivate(
  pool: Queryable,
  open: OpenAlarmState,
  input: RaiseAlarmInput,
): Promise<{ alarm: AlarmView; created: boolean; activated: boolean } | null> {
  const t = transition<AlarmRecord>(recordOf(open), { type: 'activate' }, { nowMs: input.atMs, ...SYSTEM });
  if (!t.ok) throw new Error(`alarm store: ${t.reason}`);
  const newActivation = !open.active;
  const rows = await select<AlarmRow>(
    pool,
    `with changed as (
       update alarms set state = $5, active = true, message = $6, value = $7, limit_value = $8, priority = $9,
         source_label = $10, asset_id = coalesce($11, asset_id), channel_id = coalesce($12, channel_id),
         characteristic_id = coalesce($13, characteristic_id), load_id = coalesce($14, load_id),
         last_activated_at = case when $15 then to_timestamp($16::float8 / 1000.0) else last_activated_at end,
         activation_count = activation_count + case when $15 then 1 else 0 end,
         cleared_at = case when $15 then null else cleared_at end,
         acked_at = case when $5 = 'unacked' then null else acked_at end,
         acked_by = case when $5 = 'unacked' then null else acked_by end,
         -- A re-annunciated alarm (rtn-unacked → unacked) escalates again from its new activation.
         escalation_steps_sent = case when $15 and $2 = 'rtn-unacked' then '{}' else escalation_steps_sent end,
         updated_at = now()
       where id = $1 and ${GUARD}
       returning *
     ), ev as (
       insert into alarm_events (alarm_id, at, event, from_state, to_state, active, comment)
       select id, to_timestamp($16::float8 / 1000.0), 'activate', $2, state, true, message from changed where $15
     )
     ${VIEW_OF_CHANGED}`,
    [
      open.id,
      ...guardParams(open),
      t.alarm.state,
      input.message,
      finiteOrNull(input.value),
      finiteOrNull(input.limit),
      input.priority,
      input.sourceLabel,
      input.assetId ?? null,
      input.channelId ?? null,
      input.characteristicId ?? null,
      input.loadId ?? null,
      newActivation,
      input.atMs,
    ],
  );
  const row = rows[0];
  return row ? { alarm: toView(row), created: false, activated: newActivation || t.changed } : null;
}

/**
 * Report that a source's condition returned to normal: applies `clear` to its open alarm
 * (unacknowledged → returned-to-normal unacknowledged, acknowledged → normal, held states keep
 * their state with the condition inactive). Does nothing when the source has no open alarm
 * or the alarm is already inactive.
 */
export async function clearAlarm(pool: Queryable, sourceKey: string, atMs: number): Promise<void> {
  await clearAlarmReturning(pool, sourceKey, atMs);
}

/** {@link clearAlarm}, returning the alarm when it changed (for the caller's live event). */
export async function clearAlarmReturning(
  pool: Queryable,
  sourceKey: string,
  atMs: number,
  hint?: AlarmHint,
): Promise<AlarmView | null> {
  const hinted = fromHint(hint);
  for (let attempt = 0; attempt < 20; attempt++) {
    const open = attempt === 0 && hinted !== undefined ? hinted : await readOpen(pool, sourceKey);
    if (!open || !open.active) return null;
    const t = transition<AlarmRecord>(recordOf(open), { type: 'clear' }, { nowMs: atMs, ...SYSTEM });
    if (!t.ok || !t.changed) return null;
    const rows = await select<AlarmRow>(
      pool,
      `with changed as (
         update alarms set state = $5, active = false, cleared_at = to_timestamp($6::float8 / 1000.0), updated_at = now()
          where id = $1 and ${GUARD}
         returning *
       ), ev as (
         insert into alarm_events (alarm_id, at, event, from_state, to_state, active)
         select id, to_timestamp($6::float8 / 1000.0), 'clear', $2, state, false from changed
       )
       ${VIEW_OF_CHANGED}`,
      [open.id, ...guardParams(open), t.alarm.state, atMs],
    );
    if (rows[0]) return toView(rows[0]);
  }
  throw new Error(`alarm store: could not clear ${sourceKey} (kept changing under us)`);
}

/** Who performs a transition and when. */
export interface TransitionActor {
  role: AlarmActor;
  /** The person's user id; null for the system. */
  userId: number | null;
  nowMs: number;
}

export type TransitionAlarmResult =
  | { ok: true; changed: boolean; before: AlarmView; alarm: AlarmView }
  | { ok: false; status: 404 | 409; reason: string };

/**
 * Apply one person's or the system's event to an alarm by id (acknowledge, shelve, unshelve,
 * shelf expiry, out of service, return to service, suppression). A refusal by the state model
 * comes back as `{ok: false, status: 409, reason}` with the domain's plain reason; an unknown
 * id as 404. A changing transition writes an `alarm_events` row with the comment or reason.
 */
export async function transitionAlarm(
  db: Db,
  id: number,
  event: AlarmEvent,
  ctx: TransitionActor,
  opts: { openOnly?: boolean } = {},
): Promise<TransitionAlarmResult> {
  return inTransaction(db, async (t) => {
    // Lock the alarm row only (the joins are read afterwards, outside the lock clause).
    const locked = await Alarm.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
    if (!locked) return { ok: false, status: 404, reason: `alarm ${id} does not exist` };
    // A closed occurrence (normal) is not the source's open alarm any more.
    if (opts.openOnly && locked.state === 'normal') return { ok: false, status: 404, reason: `alarm ${id} is no longer open` };
    const before = (await viewById(t, id))!;
    const tr = transition<AlarmRecord>(recordOfView(before), event, { nowMs: ctx.nowMs, role: ctx.role });
    if (!tr.ok) return { ok: false, status: 409, reason: tr.reason };
    if (!tr.changed) return { ok: true, changed: false, before, alarm: before };
    const acked = event.type === 'ack';
    const toUnacked = tr.alarm.state === 'unacked';
    await locked.update(
      {
        state: tr.alarm.state,
        active: tr.alarm.active,
        shelvedUntil: tr.alarm.shelvedUntilMs == null ? null : new Date(tr.alarm.shelvedUntilMs),
        ackedAt: acked ? new Date(ctx.nowMs) : toUnacked ? null : locked.ackedAt,
        ackedBy: acked ? ctx.userId : toUnacked ? null : locked.ackedBy,
        updatedAt: new Date(),
      },
      { transaction: t },
    );
    await AlarmEventRow.create(
      {
        alarmId: id,
        at: new Date(ctx.nowMs),
        event: event.type,
        fromState: before.state,
        toState: tr.alarm.state,
        active: tr.alarm.active,
        userId: ctx.userId,
        comment: eventText(event),
      },
      { transaction: t },
    );
    const after = (await viewById(t, id))!;
    return { ok: true, changed: true, before, alarm: after };
  });
}

function eventText(event: AlarmEvent): string | null {
  switch (event.type) {
    case 'ack':
      return event.comment.trim();
    case 'shelve':
      return `${event.minutes} min: ${event.reason.trim()}`;
    case 'remove-from-service':
    case 'return-to-service':
      return event.reason.trim();
    default:
      return null;
  }
}

function recordOf(r: OpenAlarmState): AlarmRecord {
  return { state: r.state, active: r.active, shelvedUntilMs: r.shelvedUntilMs };
}

function recordOfView(a: AlarmView): AlarmRecord {
  return { state: a.state, active: a.active, shelvedUntilMs: a.shelvedUntilMs };
}

function finiteOrNull(v: number | null | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

// ---------------------------------------------------------------------------------------------
// Reads
// ---------------------------------------------------------------------------------------------

/** One alarm by id, or null. */
export async function getAlarm(pool: Queryable, id: number): Promise<AlarmView | null> {
  if (isDb(pool)) return viewById(pool, id);
  const row = await selectOne(pool, 'a.id = $1', [id]);
  return row ? toView(row) : null;
}

/** The open alarm of a source (any state but normal), or null. */
export async function openAlarmForSource(pool: Queryable, sourceKey: string): Promise<AlarmView | null> {
  const row = await selectOne(pool, `a.source_key = $1 and a.state <> 'normal'`, [sourceKey]);
  return row ? toView(row) : null;
}

/** An alarm's transitions, oldest first, with the person's name. */
export async function alarmEvents(db: Db, alarmId: number): Promise<AlarmEventView[]> {
  const rows = await AlarmEventRow.findAll({
    where: { alarmId },
    include: [{ model: User, attributes: ['displayName'], required: false }],
    order: [
      ['at', 'ASC'],
      ['id', 'ASC'],
    ],
    ...txOpt(db),
  });
  return rows.map((r) => {
    const e = r as AlarmEventRow & { User?: { displayName: string } | null };
    return {
      id: Number(e.id),
      atMs: e.at.getTime(),
      event: e.event,
      fromState: e.fromState as AlarmState | null,
      toState: e.toState as AlarmState,
      active: e.active,
      userId: e.userId,
      userName: e.User?.displayName ?? null,
      comment: e.comment,
    };
  });
}

export interface ListAlarmsFilter {
  /** ISA state names, or 'open' for the annunciated states (unacked, acked, rtn-unacked). */
  states?: readonly (AlarmState | 'open')[];
  priorities?: readonly AlarmPriority[];
  channelId?: number;
  limit: number;
  /** Only alarms raised or updated at/after this time. */
  sinceMs?: number;
}

/**
 * Alarms for the queue: needing acknowledgement first, then highest priority, then newest
 * activation.
 */
export async function listAlarms(pool: Queryable, f: ListAlarmsFilter): Promise<AlarmView[]> {
  const where: string[] = [];
  const params: unknown[] = [];
  if (f.states && f.states.length > 0) {
    const set = new Set<string>();
    for (const s of f.states) {
      if (s === 'open') ['unacked', 'acked', 'rtn-unacked'].forEach((x) => set.add(x));
      else set.add(s);
    }
    params.push([...set]);
    where.push(`a.state = any($${params.length})`);
  }
  if (f.priorities && f.priorities.length > 0) {
    params.push([...f.priorities]);
    where.push(`a.priority = any($${params.length})`);
  }
  if (f.channelId !== undefined) {
    params.push(f.channelId);
    where.push(`a.channel_id = $${params.length}`);
  }
  if (f.sinceMs !== undefined) {
    params.push(f.sinceMs);
    where.push(`a.updated_at >= to_timestamp($${params.length} / 1000.0)`);
  }
  params.push(f.limit);
  const rows = await select<AlarmRow>(
    pool,
    `select ${COLUMNS} from ${FROM}
      ${where.length ? `where ${where.join(' and ')}` : ''}
      order by (a.state in ('unacked','rtn-unacked')) desc,
               case a.priority when 'high' then 0 when 'medium' then 1 else 2 end,
               a.active desc, a.last_activated_at desc, a.id desc
      limit $${params.length}`,
    params,
  );
  return rows.map(toView);
}

// ---------------------------------------------------------------------------------------------
// Worker duties
// ---------------------------------------------------------------------------------------------

/** Shelved alarms whose shelf has ended at `nowMs`: apply `shelf-expired` (system). Returns the changed alarms. */
export async function expireShelves(db: Db, nowMs: number): Promise<AlarmView[]> {
  const due = await Alarm.findAll({
    attributes: ['id'],
    where: { state: 'shelved', [Op.or]: [{ shelvedUntil: null }, { shelvedUntil: { [Op.lte]: new Date(nowMs) } }] },
    ...txOpt(db),
  });
  const out: AlarmView[] = [];
  for (const { id } of due) {
    const r = await transitionAlarm(db, id, { type: 'shelf-expired' }, { role: 'system', userId: null, nowMs });
    if (r.ok && r.changed) out.push(r.alarm);
  }
  return out;
}

/** Alarms that may escalate (waiting for acknowledgement), for the escalation duty. */
export async function alarmsAwaitingAck(db: Db): Promise<AlarmView[]> {
  const rows = await Alarm.findAll({
    where: { state: ['unacked', 'rtn-unacked'] },
    include: VIEW_INCLUDE(),
    order: [['id', 'ASC']],
    ...txOpt(db),
  });
  return rows.map((a) => viewOfModel(a as AlarmWithJoins));
}

/**
 * Record that escalation step `stepIndex` was sent for an alarm (once: a step already recorded
 * is not added again) and log an `escalate` event. Returns false when it had already been recorded.
 * The claim is one guarded `array_append` (two workers never both claim a step).
 */
export async function recordEscalation(db: Db, alarmId: number, stepIndex: number, atMs: number, note: string): Promise<boolean> {
  return inTransaction(db, async (t) => {
    const [row] = await select<{ state: AlarmState; active: boolean }>(
      t,
      `update alarms set escalation_steps_sent = array_append(escalation_steps_sent, $2), updated_at = now()
        where id = $1 and not ($2 = any(escalation_steps_sent)) returning state, active`,
      [alarmId, stepIndex],
    );
    if (!row) return false;
    await AlarmEventRow.create(
      {
        alarmId,
        at: new Date(atMs),
        event: 'escalate',
        fromState: row.state,
        toState: row.state,
        active: row.active,
        userId: null,
        comment: note,
      },
      { transaction: t },
    );
    return true;
  });
}

/** Release a claimed escalation step (the e-mail could not be sent; it will be tried again). */
export async function releaseEscalation(db: Db, alarmId: number, stepIndex: number): Promise<void> {
  await inTransaction(db, async (t) => {
    await execute(t, `update alarms set escalation_steps_sent = array_remove(escalation_steps_sent, $2) where id = $1`, [
      alarmId,
      stepIndex,
    ]);
    const last = await AlarmEventRow.findOne({
      where: { alarmId, event: 'escalate' },
      order: [['id', 'DESC']],
      transaction: t,
    });
    await last?.destroy({ transaction: t });
  });
}

// ---------------------------------------------------------------------------------------------
// Alarm log for the health figures
// ---------------------------------------------------------------------------------------------

/** One annunciated activation, for `alarmKpis` (domain) and the health charts. */
export interface AlarmLogRow {
  id: string;
  alarmId: number;
  source: string;
  sourceKind: AlarmSourceKind;
  priority: AlarmPriority;
  activatedAtMs: number;
  clearedAtMs: number | null;
  ackedAtMs: number | null;
}

/**
 * Every activation that reached the operator (event `activate` into `unacked`) from
 * `fromMs − lookbackMs` to `toMs`, with when that activation cleared and was acknowledged.
 * The look-back lets alarms raised before the period count as stale.
 */
export async function alarmLog(
  pool: Queryable,
  fromMs: number,
  toMs: number,
  lookbackMs = 7 * 86_400_000,
): Promise<AlarmLogRow[]> {
  const rows = await select<{
    id: number;
    alarm_id: number;
    source: string;
    source_kind: AlarmSourceKind;
    priority: AlarmPriority;
    at: Date;
    cleared: Date | null;
    acked: Date | null;
  }>(
    pool,
    `select e.id, e.alarm_id, a.priority, a.source_kind, e.at,
            a.source_label || case when a.source_key like '%:high' then ' (high)'
                                   when a.source_key like '%:low' then ' (low)' else '' end as source,
            (select min(c.at) from alarm_events c where c.alarm_id = e.alarm_id and c.event = 'clear' and c.at >= e.at) as cleared,
            (select min(k.at) from alarm_events k where k.alarm_id = e.alarm_id and k.event = 'ack' and k.at >= e.at) as acked
       from alarm_events e join alarms a on a.id = e.alarm_id
      where e.event = 'activate' and e.to_state = 'unacked'
        and e.at >= to_timestamp($1 / 1000.0) and e.at < to_timestamp($2 / 1000.0)
      order by e.at, e.id`,
    [fromMs - lookbackMs, toMs],
  );
  return rows.map((r) => ({
    id: String(r.id),
    alarmId: r.alarm_id,
    source: r.source,
    sourceKind: r.source_kind,
    priority: r.priority,
    activatedAtMs: r.at.getTime(),
    clearedAtMs: ms(r.cleared),
    ackedAtMs: ms(r.acked),
  }));
}

/**
 * Apply a system event (`suppress`, `unsuppress`, …) to a source's open alarm, if it has one:
 * suppression by design, e.g. an oven's door and thermocouple alarms while the oven is idle.
 * Returns the alarm when the event changed it, else null.
 */
export async function systemEventForSource(
  pool: Db,
  sourceKey: string,
  event: Extract<AlarmEvent, { type: 'suppress' | 'unsuppress' }>,
  atMs: number,
  hint?: AlarmHint,
): Promise<AlarmView | null> {
  const hinted = fromHint(hint);
  const system = { role: 'system' as const, userId: null, nowMs: atMs };
  let open = hinted !== undefined ? hinted : await readOpen(pool, sourceKey);
  if (!open) return null;
  let r = await transitionAlarm(pool, open.id, event, system, { openOnly: true });
  if (!r.ok && hinted !== undefined) {
    // The hint was stale (e.g. acknowledged back to normal on the web meanwhile): read what is open now.
    open = await readOpen(pool, sourceKey);
    if (!open) return null;
    r = await transitionAlarm(pool, open.id, event, system, { openOnly: true });
  }
  return r.ok && r.changed ? r.alarm : null;
}
