/**
 * Alarm settings in PostgreSQL (worker-safe: `pg.Pool` parameter, no Astro env): the
 * per-channel limit / stale-data configs (`alarm_configs`) and, in `site_settings`, the
 * escalation rules per priority (`alarmEscalation`) and the on-shift engineer's e-mail
 * (`onShiftEngineerEmail`). Read by the ingest worker's alarm sources and written by the
 * engineer's settings endpoints.
 */
import type pg from 'pg';
import type { AlarmPriority, EscalationRule } from '../shared/alarms.ts';
import { EscalationRuleSchema } from '../shared/alarms.ts';
import {
  DEFAULT_ESCALATION,
  DEFAULT_ON_SHIFT_ENGINEER_EMAIL,
  type AlarmConfigInput,
  type CharacteristicAlarmConfig,
  type CharacteristicAlarmConfigView,
  type ChannelAlarmConfigView,
  type EscalationSettings,
  type LimitsMode,
} from '../shared/alarm-views.ts';
import type { EscalationRules } from '../domain/alarms/escalation.ts';

type Queryable = pg.Pool | pg.PoolClient;

/** One channel's alarm config as the worker uses it. */
export interface ChannelAlarmConfig {
  id: number;
  channelId: number;
  enabled: boolean;
  limitsMode: LimitsMode;
  high: number | null;
  low: number | null;
  deadband: number;
  onDelayMs: number;
  offDelayMs: number;
  priority: AlarmPriority;
  onlyWhileRunning: boolean;
  label: string | null;
  staleSeconds: number | null;
  stalePriority: AlarmPriority;
  note: string | null;
  updatedAtMs: number;
  updatedBy: string | null;
}

interface ConfigRow {
  id: number;
  channel_id: number;
  enabled: boolean;
  limits_mode: LimitsMode;
  high: number | null;
  low: number | null;
  deadband: number;
  on_delay_ms: number;
  off_delay_ms: number;
  priority: AlarmPriority;
  only_while_running: boolean;
  label: string | null;
  stale_seconds: number | null;
  stale_priority: AlarmPriority;
  note: string | null;
  updated_at: Date;
  updated_by_name: string | null;
}

const CONFIG_SQL = `select c.id, c.channel_id, c.enabled, c.limits_mode, c.high, c.low, c.deadband, c.on_delay_ms,
  c.off_delay_ms, c.priority, c.only_while_running, c.label, c.stale_seconds, c.stale_priority, c.note, c.updated_at,
  u.display_name as updated_by_name
  from alarm_configs c left join users u on u.id = c.updated_by`;

function toConfig(r: ConfigRow): ChannelAlarmConfig {
  return {
    id: r.id,
    channelId: r.channel_id,
    enabled: r.enabled,
    limitsMode: r.limits_mode,
    high: r.high,
    low: r.low,
    deadband: r.deadband,
    onDelayMs: r.on_delay_ms,
    offDelayMs: r.off_delay_ms,
    priority: r.priority,
    onlyWhileRunning: r.only_while_running,
    label: r.label,
    staleSeconds: r.stale_seconds,
    stalePriority: r.stale_priority,
    note: r.note,
    updatedAtMs: r.updated_at.getTime(),
    updatedBy: r.updated_by_name,
  };
}

/** Every channel's alarm config, keyed by channel id. */
export async function channelAlarmConfigs(pool: Queryable): Promise<Map<number, ChannelAlarmConfig>> {
  const res = await pool.query<ConfigRow>(`${CONFIG_SQL} where c.channel_id is not null`);
  return new Map(res.rows.map((r) => [r.channel_id, toConfig(r)]));
}

/** One channel's config, or null. */
export async function channelAlarmConfig(pool: Queryable, channelId: number): Promise<ChannelAlarmConfig | null> {
  const res = await pool.query<ConfigRow>(`${CONFIG_SQL} where c.channel_id = $1`, [channelId]);
  return res.rows[0] ? toConfig(res.rows[0]) : null;
}

function inputOf(c: ChannelAlarmConfig): AlarmConfigInput {
  return {
    enabled: c.enabled,
    limitsMode: c.limitsMode,
    high: c.high,
    low: c.low,
    deadband: c.deadband,
    onDelayMs: c.onDelayMs,
    offDelayMs: c.offDelayMs,
    priority: c.priority,
    onlyWhileRunning: c.onlyWhileRunning,
    label: c.label,
    staleSeconds: c.staleSeconds,
    stalePriority: c.stalePriority,
    note: c.note,
  };
}

/** Every channel of the plant with its alarm config (null when none), in asset / channel order. */
export async function listChannelAlarmConfigs(pool: Queryable): Promise<ChannelAlarmConfigView[]> {
  const [channels, configs] = await Promise.all([
    pool.query<{ id: number; name: string; kind: string; unit: string; asset_id: number; asset_name: string }>(
      `select c.id, c.name, c.kind, c.unit, c.asset_id, a.name as asset_name
         from channels c join assets a on a.id = c.asset_id order by a.code, c.key`,
    ),
    channelAlarmConfigs(pool),
  ]);
  return channels.rows.map((c) => {
    const cfg = configs.get(c.id);
    return {
      channelId: c.id,
      channelName: c.name,
      channelKind: c.kind,
      unit: c.unit,
      assetId: c.asset_id,
      assetName: c.asset_name,
      config: cfg ? { ...inputOf(cfg), id: cfg.id, updatedAtMs: cfg.updatedAtMs, updatedBy: cfg.updatedBy } : null,
    };
  });
}

/** Does the channel exist? */
export async function channelExists(pool: Queryable, channelId: number): Promise<boolean> {
  const res = await pool.query('select 1 from channels where id = $1', [channelId]);
  return (res.rowCount ?? 0) > 0;
}

/** Insert or replace one channel's alarm config. Returns the config before (null if new) and after. */
export async function upsertChannelAlarmConfig(
  pool: Queryable,
  channelId: number,
  input: AlarmConfigInput,
  userId: number | null,
): Promise<{ before: ChannelAlarmConfig | null; after: ChannelAlarmConfig }> {
  const before = await channelAlarmConfig(pool, channelId);
  await pool.query(
    `insert into alarm_configs (channel_id, enabled, limits_mode, high, low, deadband, on_delay_ms, off_delay_ms, priority,
       only_while_running, label, stale_seconds, stale_priority, note, updated_at, updated_by)
     values ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11,$12,$13,$14, now(), $15)
     on conflict (channel_id) where channel_id is not null do update set
       enabled = excluded.enabled, limits_mode = excluded.limits_mode, high = excluded.high, low = excluded.low,
       deadband = excluded.deadband, on_delay_ms = excluded.on_delay_ms, off_delay_ms = excluded.off_delay_ms,
       priority = excluded.priority, only_while_running = excluded.only_while_running, label = excluded.label,
       stale_seconds = excluded.stale_seconds, stale_priority = excluded.stale_priority, note = excluded.note,
       updated_at = now(), updated_by = excluded.updated_by`,
    [
      channelId,
      input.enabled,
      input.limitsMode,
      input.high ?? null,
      input.low ?? null,
      input.deadband,
      input.onDelayMs,
      input.offDelayMs,
      input.priority,
      input.onlyWhileRunning,
      input.label ?? null,
      input.staleSeconds ?? null,
      input.stalePriority,
      input.note ?? null,
      userId,
    ],
  );
  return { before, after: (await channelAlarmConfig(pool, channelId))! };
}

/** Remove a channel's config (the channel then falls back to its process window). Returns what was removed. */
export async function deleteChannelAlarmConfig(pool: Queryable, channelId: number): Promise<ChannelAlarmConfig | null> {
  const before = await channelAlarmConfig(pool, channelId);
  if (before) await pool.query('delete from alarm_configs where channel_id = $1', [channelId]);
  return before;
}

// ---------------------------------------------------------------------------------------------
// Escalation settings (site_settings)
// ---------------------------------------------------------------------------------------------

export const ESCALATION_KEY = 'alarmEscalation';
export const ON_SHIFT_EMAIL_KEY = 'onShiftEngineerEmail';

/** The escalation rules and the on-shift engineer's address, with defaults where unset or unreadable. */
export async function escalationSettings(pool: Queryable): Promise<EscalationSettings> {
  const res = await pool.query<{ key: string; value: unknown }>(`select key, value from site_settings where key = any($1)`, [
    [ESCALATION_KEY, ON_SHIFT_EMAIL_KEY],
  ]);
  const byKey = new Map(res.rows.map((r) => [r.key, r.value]));
  let rules: EscalationRule[] = Object.entries(DEFAULT_ESCALATION).map(([priority, steps]) => ({
    priority: priority as AlarmPriority,
    steps: [...(steps ?? [])],
  }));
  const stored = byKey.get(ESCALATION_KEY) as { rules?: unknown } | undefined;
  if (stored && Array.isArray(stored.rules)) {
    const parsed = stored.rules.map((r) => EscalationRuleSchema.safeParse(r)).filter((p) => p.success);
    rules = parsed.map((p) => p.data!);
  }
  const email = byKey.get(ON_SHIFT_EMAIL_KEY);
  return {
    rules,
    onShiftEngineerEmail: typeof email === 'string' && email.includes('@') ? email : DEFAULT_ON_SHIFT_ENGINEER_EMAIL,
  };
}

/** Store the escalation settings. Returns the settings before and after. */
export async function saveEscalationSettings(
  pool: Queryable,
  settings: EscalationSettings,
): Promise<{ before: EscalationSettings; after: EscalationSettings }> {
  const before = await escalationSettings(pool);
  await pool.query(
    `insert into site_settings (key, value, updated_at) values ($1, $2, now()), ($3, $4, now())
     on conflict (key) do update set value = excluded.value, updated_at = now()`,
    [
      ESCALATION_KEY,
      JSON.stringify({ rules: settings.rules }),
      ON_SHIFT_EMAIL_KEY,
      JSON.stringify(settings.onShiftEngineerEmail),
    ],
  );
  return { before, after: await escalationSettings(pool) };
}

/** The rules as the domain's `dueEscalations` takes them. */
export function rulesByPriority(rules: readonly EscalationRule[]): EscalationRules {
  const out: EscalationRules = {};
  for (const r of rules) out[r.priority] = r.steps;
  return out;
}

// ---------------------------------------------------------------------------------------------
// Control-chart (SPC) alarms per characteristic
// ---------------------------------------------------------------------------------------------

/** Every characteristic with its alarm settings (null = none: alarms on at the priority raised). */
export async function listCharacteristicAlarmConfigs(pool: Queryable): Promise<CharacteristicAlarmConfigView[]> {
  const res = await pool.query<{
    id: number;
    name: string;
    asset_name: string;
    active: boolean;
    enabled: boolean | null;
    priority: AlarmPriority | null;
    note: string | null;
    updated_at: Date | null;
    updated_by: string | null;
  }>(
    `select ch.id, ch.name, a.name as asset_name, ch.active, c.enabled, c.priority, c.note, c.updated_at,
            u.display_name as updated_by
       from characteristics ch join assets a on a.id = ch.asset_id
       left join alarm_configs c on c.characteristic_id = ch.id
       left join users u on u.id = c.updated_by
      order by ch.name`,
  );
  return res.rows.map((r) => ({
    characteristicId: r.id,
    name: r.name,
    assetName: r.asset_name,
    active: r.active,
    config:
      r.enabled === null || r.priority === null || r.updated_at === null
        ? null
        : {
            enabled: r.enabled,
            priority: r.priority,
            note: r.note,
            updatedAtMs: r.updated_at.getTime(),
            updatedBy: r.updated_by,
          },
  }));
}

/** A characteristic's alarm settings, or null when it has none (or the characteristics table is absent). */
export async function characteristicAlarmConfig(
  pool: Queryable,
  characteristicId: number,
): Promise<CharacteristicAlarmConfig | null> {
  const res = await pool.query<{ enabled: boolean; priority: AlarmPriority; note: string | null }>(
    `select enabled, priority, note from alarm_configs where characteristic_id = $1`,
    [characteristicId],
  );
  return res.rows[0] ?? null;
}

export async function characteristicExists(pool: Queryable, characteristicId: number): Promise<boolean> {
  const res = await pool.query('select 1 from characteristics where id = $1', [characteristicId]);
  return (res.rowCount ?? 0) > 0;
}

/** Insert or replace a characteristic's alarm settings; returns before (null if new) and after. */
export async function upsertCharacteristicAlarmConfig(
  pool: Queryable,
  characteristicId: number,
  input: CharacteristicAlarmConfig,
  userId: number | null,
): Promise<{ before: CharacteristicAlarmConfig | null; after: CharacteristicAlarmConfig }> {
  const before = await characteristicAlarmConfig(pool, characteristicId);
  await pool.query(
    `insert into alarm_configs (characteristic_id, enabled, priority, note, updated_at, updated_by)
     values ($1, $2, $3, $4, now(), $5)
     on conflict (characteristic_id) where characteristic_id is not null do update set
       enabled = excluded.enabled, priority = excluded.priority, note = excluded.note, updated_at = now(),
       updated_by = excluded.updated_by`,
    [characteristicId, input.enabled, input.priority, input.note ?? null, userId],
  );
  return { before, after: (await characteristicAlarmConfig(pool, characteristicId))! };
}
