/**
 * The audited changes to alarms and their settings (worker-safe): each runs in one transaction
 * that holds the change and its audit row (`withTransaction` + `auditIn`), so the two commit
 * together or not at all. The web services call these with the process's Sequelize instance and
 * then publish the live event; the core knows nothing of HTTP and refuses with `DomainError`s.
 */
import type { Sequelize } from 'sequelize';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import type { AlarmActor, AlarmEvent } from '../domain/alarms/state.ts';
import type { AlarmConfigInput, AlarmView, CharacteristicAlarmConfig, EscalationSettings } from '../shared/alarm-views.ts';
import { transitionAlarm } from './alarm-store.ts';
import {
  channelExists,
  characteristicExists,
  deleteChannelAlarmConfig,
  saveEscalationSettings,
  upsertChannelAlarmConfig,
  upsertCharacteristicAlarmConfig,
  type ChannelAlarmConfig,
} from './alarm-config-store.ts';
import { DomainError, isDomainError } from './errors.ts';

/** A person acting on alarms: the audit actor, their role (for the state model) and user id. */
export interface AlarmPerson extends AuditActor {
  role: AlarmActor;
  userId: number | null;
}

function stateOf(a: AlarmView) {
  return { state: a.state, active: a.active, shelvedUntilMs: a.shelvedUntilMs, priority: a.priority, source: a.sourceLabel };
}

function eventDetail(e: AlarmEvent): Record<string, unknown> {
  switch (e.type) {
    case 'ack':
      return { comment: e.comment.trim() };
    case 'shelve':
      return { minutes: e.minutes, reason: e.reason.trim() };
    case 'remove-from-service':
    case 'return-to-service':
      return { reason: e.reason.trim() };
    default:
      return {};
  }
}

/**
 * Apply a person's event to an alarm (acknowledge, shelve, unshelve, out of service, return to
 * service): `not-found` when unknown, `conflict` with the state model's reason when refused;
 * audited (`alarm.<event>`) in the same transaction when it changed something. Returns the
 * alarm and whether it changed (the caller publishes a live event only then).
 */
export async function applyAlarmEventAudited(
  sequelize: Sequelize,
  person: AlarmPerson,
  id: number,
  event: AlarmEvent,
  nowMs: number,
): Promise<{ alarm: AlarmView; changed: boolean }> {
  return withTransaction(sequelize, async (t) => {
    const r = await transitionAlarm(t, id, event, { role: person.role, userId: person.userId, nowMs });
    if (!r.ok) {
      if (r.status === 404) throw new DomainError('not-found', 'Not found', r.reason, { reason: r.reason });
      throw new DomainError('conflict', 'Refused by the alarm state model', r.reason, { reason: r.reason });
    }
    if (r.changed) {
      await auditIn(t, person, {
        action: `alarm.${event.type}`,
        entity: 'alarm',
        entityId: id,
        before: stateOf(r.before),
        after: { ...stateOf(r.alarm), ...eventDetail(event) },
      });
    }
    return { alarm: r.alarm, changed: r.changed };
  });
}

export interface BulkAckOutcome {
  acknowledged: { alarm: AlarmView; changed: boolean }[];
  refused: { id: number; kind: DomainError['kind']; reason: string }[];
}

/** Acknowledge several alarms with one comment; each is transitioned and audited in its own transaction. */
export async function bulkAckAudited(
  sequelize: Sequelize,
  person: AlarmPerson,
  ids: readonly number[],
  comment: string,
  nowMs: number,
): Promise<BulkAckOutcome> {
  const out: BulkAckOutcome = { acknowledged: [], refused: [] };
  for (const id of ids) {
    try {
      out.acknowledged.push(await applyAlarmEventAudited(sequelize, person, id, { type: 'ack', comment }, nowMs));
    } catch (e) {
      if (!isDomainError(e, 'not-found', 'conflict')) throw e;
      out.refused.push({ id, kind: e.kind, reason: e.detail ?? e.title });
    }
  }
  return out;
}

/** Save a channel's alarm settings (audited `alarm.configure`). */
export async function saveChannelAlarmConfig(
  sequelize: Sequelize,
  actor: AuditActor,
  channelId: number,
  input: AlarmConfigInput,
): Promise<ChannelAlarmConfig> {
  return withTransaction(sequelize, async (t) => {
    if (!(await channelExists(t, channelId))) throw new DomainError('not-found', 'Not found', `No channel ${channelId}.`);
    const { before, after } = await upsertChannelAlarmConfig(t, channelId, input, actor.id);
    await auditIn(t, actor, { action: 'alarm.configure', entity: 'alarm_config', entityId: channelId, before, after });
    return after;
  });
}

/** Remove a channel's own alarm settings (audited `alarm.configure`, after null). */
export async function removeChannelAlarmConfig(sequelize: Sequelize, actor: AuditActor, channelId: number): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const before = await deleteChannelAlarmConfig(t, channelId);
    if (!before) throw new DomainError('not-found', 'Not found', `Channel ${channelId} has no alarm settings of its own.`);
    await auditIn(t, actor, { action: 'alarm.configure', entity: 'alarm_config', entityId: channelId, before, after: null });
  });
}

/** Save a characteristic's control-chart alarm settings (audited). */
export async function saveCharacteristicAlarmConfig(
  sequelize: Sequelize,
  actor: AuditActor,
  characteristicId: number,
  input: CharacteristicAlarmConfig,
): Promise<CharacteristicAlarmConfig> {
  return withTransaction(sequelize, async (t) => {
    if (!(await characteristicExists(t, characteristicId))) {
      throw new DomainError('not-found', 'Not found', `No characteristic ${characteristicId}.`);
    }
    const { before, after } = await upsertCharacteristicAlarmConfig(t, characteristicId, input, actor.id);
    await auditIn(t, actor, {
      action: 'alarm.configure',
      entity: 'alarm_config_characteristic',
      entityId: characteristicId,
      before,
      after,
    });
    return after;
  });
}

/** Save the escalation rules and the on-shift engineer's address (site settings; audited). */
export async function saveEscalationAudited(
  sequelize: Sequelize,
  actor: AuditActor,
  s: EscalationSettings,
): Promise<EscalationSettings> {
  return withTransaction(sequelize, async (t) => {
    const { before, after } = await saveEscalationSettings(t, s);
    await auditIn(t, actor, { action: 'alarm.escalation', entity: 'site_settings', entityId: 'alarmEscalation', before, after });
    return after;
  });
}
