/**
 * Alarm services for the web server's endpoints and pages: the worker-safe stores called with
 * the web pool, plus the audit trail and the live `alarms` event after every change.
 */
import type { AlarmEvent } from '../../domain/alarms/state.ts';
import { alarmKpis, type AlarmKpiReport } from '../../domain/alarms/kpi.ts';
import type { AlarmConfigInput, AlarmView, CharacteristicAlarmConfig, EscalationSettings } from '../../shared/alarm-views.ts';
import type { SessionUser } from '../auth.ts';
import { publishLive } from '../broker-link.ts';
import { sequelize } from '../db.ts';
import { actorOf } from '../guard.ts';
import { DOMAIN_ERROR_STATUS, HttpProblem } from '../http.ts';
import { alarmEvents, alarmLog, getAlarm, listAlarms, type AlarmLogRow, type ListAlarmsFilter } from '../../core/alarm-store.ts';
import { csvField } from '../../shared/csv-table.ts';
import {
  escalationSettings,
  listChannelAlarmConfigs as listChannelConfigs,
  listCharacteristicAlarmConfigs as listCharacteristicConfigs,
} from '../../core/alarm-config-store.ts';
import {
  applyAlarmEventAudited,
  bulkAckAudited,
  removeChannelAlarmConfig,
  saveChannelAlarmConfig,
  saveCharacteristicAlarmConfig,
  saveEscalationAudited,
  type AlarmPerson,
} from '../../core/alarm-commands.ts';

export const listChannelAlarmConfigs = () => listChannelConfigs(sequelize());
export const listCharacteristicAlarmConfigs = () => listCharacteristicConfigs(sequelize());

export async function alarmsList(f: ListAlarmsFilter): Promise<AlarmView[]> {
  return listAlarms(sequelize(), f);
}

export async function alarmWithEvents(id: number) {
  const alarm = await getAlarm(sequelize(), id);
  if (!alarm) throw new HttpProblem(404, 'Not found', `No alarm ${id}.`);
  return { ...alarm, events: await alarmEvents(sequelize(), id) };
}

function personOf(user: SessionUser, address: string | null): AlarmPerson {
  return { ...actorOf(user, address), role: user.role, userId: user.id };
}

/**
 * Apply a person's event to an alarm: 404 when unknown, 409 with the state model's reason
 * when refused; audited (`alarm.<event>`) in the change's transaction and published live when
 * it changed something.
 */
export async function applyAlarmEvent(
  user: SessionUser,
  address: string | null,
  id: number,
  event: AlarmEvent,
): Promise<AlarmView> {
  const r = await applyAlarmEventAudited(sequelize(), personOf(user, address), id, event, Date.now());
  if (r.changed) publishLive('alarms', r.alarm);
  return r.alarm;
}

export interface BulkAckResult {
  acknowledged: AlarmView[];
  refused: { id: number; status: number; reason: string }[];
}

/** Acknowledge several alarms with one comment; each is transitioned and audited on its own. */
export async function bulkAck(user: SessionUser, address: string | null, ids: number[], comment: string): Promise<BulkAckResult> {
  const r = await bulkAckAudited(sequelize(), personOf(user, address), ids, comment, Date.now());
  for (const a of r.acknowledged) if (a.changed) publishLive('alarms', a.alarm);
  return {
    acknowledged: r.acknowledged.map((a) => a.alarm),
    refused: r.refused.map((x) => ({ id: x.id, status: DOMAIN_ERROR_STATUS[x.kind], reason: x.reason })),
  };
}

// ---------------------------------------------------------------------------------------------
// Settings
// ---------------------------------------------------------------------------------------------

export async function saveChannelConfig(user: SessionUser, address: string | null, channelId: number, input: AlarmConfigInput) {
  return saveChannelAlarmConfig(sequelize(), actorOf(user, address), channelId, input);
}

export async function removeChannelConfig(user: SessionUser, address: string | null, channelId: number) {
  await removeChannelAlarmConfig(sequelize(), actorOf(user, address), channelId);
}

export async function saveCharacteristicConfig(
  user: SessionUser,
  address: string | null,
  characteristicId: number,
  input: CharacteristicAlarmConfig,
) {
  return saveCharacteristicAlarmConfig(sequelize(), actorOf(user, address), characteristicId, input);
}

export async function escalation(): Promise<EscalationSettings> {
  return escalationSettings(sequelize());
}

export async function saveEscalation(
  user: SessionUser,
  address: string | null,
  s: EscalationSettings,
): Promise<EscalationSettings> {
  return saveEscalationAudited(sequelize(), actorOf(user, address), s);
}

// ---------------------------------------------------------------------------------------------
// Health
// ---------------------------------------------------------------------------------------------

export interface AlarmHealth {
  report: AlarmKpiReport;
  /** Annunciated alarms per fixed 10-minute bucket over the period (bucket start, count). */
  per10Min: { startMs: number; count: number }[];
  /** Mean time from activation to acknowledgement of the acknowledged alarms, ms (null when none). */
  meanTimeToAckMs: number | null;
  log: AlarmLogRow[];
}

const TEN_MIN = 600_000;

/** The alarm-system health figures of a period (`alarmKpis`, ANSI/ISA-18.2 benchmarks) and the 10-minute series. */
export async function alarmHealth(fromMs: number, toMs: number, positions: number): Promise<AlarmHealth> {
  const log = await alarmLog(sequelize(), fromMs, toMs);
  const report = alarmKpis(log, { fromMs, toMs, operatorPositions: positions });
  const start = Math.floor(fromMs / TEN_MIN) * TEN_MIN;
  const buckets = new Map<number, number>();
  for (let t = start; t < toMs; t += TEN_MIN) buckets.set(t, 0);
  const inWindow = log.filter((e) => e.activatedAtMs >= fromMs && e.activatedAtMs < toMs);
  for (const e of inWindow) {
    const b = Math.floor(e.activatedAtMs / TEN_MIN) * TEN_MIN;
    buckets.set(b, (buckets.get(b) ?? 0) + 1);
  }
  const acked = inWindow.filter((e) => e.ackedAtMs !== null);
  const meanTimeToAckMs =
    acked.length === 0 ? null : acked.reduce((s, e) => s + (e.ackedAtMs! - e.activatedAtMs), 0) / acked.length;
  return {
    report,
    per10Min: [...buckets].map(([startMs, count]) => ({ startMs, count })),
    meanTimeToAckMs,
    log: inWindow,
  };
}

/** The health figures as CSV sections (one file a spreadsheet opens). */
export function healthCsv(h: AlarmHealth, zone: string): string {
  const iso = (ms: number) => new Date(ms).toISOString();
  // Source names are engineer-controlled: quoted and formula-neutralised like every other export.
  const q = (s: string) => csvField(s);
  const r = h.report;
  const lines: string[] = [];
  lines.push('section,key,value');
  lines.push(`summary,from,${iso(r.window.fromMs)}`);
  lines.push(`summary,to,${iso(r.window.toMs)}`);
  lines.push(`summary,time zone of the screens,${q(zone)}`);
  lines.push(`summary,operator positions,${r.window.operatorPositions}`);
  lines.push(`summary,alarms,${r.totalAlarms}`);
  lines.push(`summary,average per 10 min per position,${r.rate.averagePer10MinPerPosition.toFixed(3)}`);
  lines.push(`summary,average per hour per position,${r.rate.averagePerHourPerPosition.toFixed(3)}`);
  lines.push(`summary,peak in any 10 min,${r.rate.peak10MinCount}`);
  lines.push(`summary,rate band,${r.rate.band}`);
  lines.push(`summary,time in flood %,${r.floods.percentTimeInFlood.toFixed(3)}`);
  lines.push(`summary,mean time to acknowledge s,${h.meanTimeToAckMs === null ? '' : (h.meanTimeToAckMs / 1000).toFixed(1)}`);
  lines.push(`summary,benchmark,${q(r.rate.benchmark)}`);
  for (const p of ['high', 'medium', 'low'] as const) {
    lines.push(`priority,${p},${r.priorities.counts[p]} (${r.priorities.percent[p].toFixed(1)} %)`);
  }
  lines.push('');
  lines.push('bucket start (UTC),alarms in 10 min');
  for (const b of h.per10Min) lines.push(`${iso(b.startMs)},${b.count}`);
  lines.push('');
  lines.push('flood start (UTC),flood end (UTC),alarms');
  for (const f of r.floods.periods) lines.push(`${iso(f.startMs)},${iso(f.endMs)},${f.count}`);
  lines.push('');
  lines.push('top source,alarms,share %');
  for (const s of r.topSources) lines.push(`${q(s.source)},${s.count},${s.sharePercent.toFixed(1)}`);
  lines.push('');
  lines.push('chattering source,most in 60 s,activations,first (UTC)');
  for (const c of r.chattering) lines.push(`${q(c.source)},${c.maxIn60s},${c.activations},${iso(c.firstAtMs)}`);
  lines.push('');
  lines.push('stale alarm id,source,priority,activated (UTC),active h');
  for (const s of r.stale)
    lines.push(`${s.id},${q(s.source)},${s.priority},${iso(s.activatedAtMs)},${(s.activeForMs / 3_600_000).toFixed(1)}`);
  return lines.join('\n') + '\n';
}
