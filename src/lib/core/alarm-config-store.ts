/**
 * Alarm settings in PostgreSQL (worker-safe: takes the Sequelize instance or a transaction, no Astro env; records through the
 * `AlarmConfig` and `SiteSetting` models): the
 * per-channel limit / stale-data configs (`alarm_configs`) and, in `site_settings`, the
 * escalation rules per priority (`alarmEscalation`) and the on-shift engineer's e-mail
 * (`onShiftEngineerEmail`). Read by the ingest worker's alarm sources and written by the
 * engineer's settings endpoints.
 */
import { AlarmConfig, Asset, Channel, Characteristic, User } from '../../../db/models/index.ts';
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
import { execute, inTransaction, isDb, select, txOpt, type AnyDb, type Db } from './db.ts';
import { readSettings, writeSettingIn } from './settings-store.ts';

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

type ConfigWithEditor = AlarmConfig & { editor?: { displayName: string } | null };

function toConfig(r: ConfigWithEditor): ChannelAlarmConfig {
  return {
    id: r.id,
    channelId: r.channelId!,
    enabled: r.enabled,
    limitsMode: r.limitsMode as LimitsMode,
    high: r.high,
    low: r.low,
    deadband: r.deadband,
    onDelayMs: r.onDelayMs,
    offDelayMs: r.offDelayMs,
    priority: r.priority as AlarmPriority,
    onlyWhileRunning: r.onlyWhileRunning,
    label: r.label,
    staleSeconds: r.staleSeconds,
    stalePriority: r.stalePriority as AlarmPriority,
    note: r.note,
    updatedAtMs: r.updatedAt.getTime(),
    updatedBy: r.editor?.displayName ?? null,
  };
}

const EDITOR = () => [{ model: User, as: 'editor', attributes: ['displayName'], required: false }];

/** Every channel's alarm config, keyed by channel id. */
export async function channelAlarmConfigs(db: Db): Promise<Map<number, ChannelAlarmConfig>> {
  const rows = await AlarmConfig.findAll({ where: { characteristicId: null }, include: EDITOR(), ...txOpt(db) });
  return new Map(rows.filter((r) => r.channelId !== null).map((r) => [r.channelId!, toConfig(r as ConfigWithEditor)]));
}

/** One channel's config, or null. */
export async function channelAlarmConfig(db: Db, channelId: number): Promise<ChannelAlarmConfig | null> {
  const r = await AlarmConfig.findOne({ where: { channelId }, include: EDITOR(), ...txOpt(db) });
  return r ? toConfig(r as ConfigWithEditor) : null;
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
export async function listChannelAlarmConfigs(db: Db): Promise<ChannelAlarmConfigView[]> {
  const [channels, configs] = await Promise.all([
    Channel.findAll({
      attributes: ['id', 'name', 'kind', 'unit', 'assetId', 'key'],
      include: [{ model: Asset, attributes: ['name', 'code'], required: true }],
      order: [
        [Asset, 'code', 'ASC'],
        ['key', 'ASC'],
      ],
      ...txOpt(db),
    }),
    channelAlarmConfigs(db),
  ]);
  return channels.map((ch) => {
    const c = ch as Channel & { Asset: { name: string } };
    const cfg = configs.get(c.id);
    return {
      channelId: c.id,
      channelName: c.name,
      channelKind: c.kind,
      unit: c.unit,
      assetId: c.assetId,
      assetName: c.Asset.name,
      config: cfg ? { ...inputOf(cfg), id: cfg.id, updatedAtMs: cfg.updatedAtMs, updatedBy: cfg.updatedBy } : null,
    };
  });
}

/** Does the channel exist? */
export async function channelExists(db: Db, channelId: number): Promise<boolean> {
  return (await Channel.count({ where: { id: channelId }, ...txOpt(db) })) > 0;
}

/** Insert or replace one channel's alarm config. Returns the config before (null if new) and after. */
export async function upsertChannelAlarmConfig(
  db: Db,
  channelId: number,
  input: AlarmConfigInput,
  userId: number | null,
): Promise<{ before: ChannelAlarmConfig | null; after: ChannelAlarmConfig }> {
  return inTransaction(db, async (t) => {
    // Two first saves of the same channel at once: the second waits and then updates.
    await execute(t, `select pg_advisory_xact_lock(hashtext('alarm_configs'), $1)`, [channelId]);
    const row = await AlarmConfig.findOne({ where: { channelId }, transaction: t, lock: t.LOCK.UPDATE });
    const before = row ? await channelAlarmConfig(t, channelId) : null;
    const fields = {
      enabled: input.enabled,
      limitsMode: input.limitsMode,
      high: input.high ?? null,
      low: input.low ?? null,
      deadband: input.deadband,
      onDelayMs: input.onDelayMs,
      offDelayMs: input.offDelayMs,
      priority: input.priority,
      onlyWhileRunning: input.onlyWhileRunning,
      label: input.label ?? null,
      staleSeconds: input.staleSeconds ?? null,
      stalePriority: input.stalePriority,
      note: input.note ?? null,
      updatedAt: new Date(),
      updatedBy: userId,
    };
    if (row) await row.update(fields, { transaction: t });
    else await AlarmConfig.create({ ...fields, channelId, characteristicId: null }, { transaction: t });
    return { before, after: (await channelAlarmConfig(t, channelId))! };
  });
}

/** Remove a channel's config (the channel then falls back to its process window). Returns what was removed. */
export async function deleteChannelAlarmConfig(db: Db, channelId: number): Promise<ChannelAlarmConfig | null> {
  return inTransaction(db, async (t) => {
    const before = await channelAlarmConfig(t, channelId);
    if (before) await AlarmConfig.destroy({ where: { channelId }, transaction: t });
    return before;
  });
}

// ---------------------------------------------------------------------------------------------
// Escalation settings (site_settings)
// ---------------------------------------------------------------------------------------------

export const ESCALATION_KEY = 'alarmEscalation';
export const ON_SHIFT_EMAIL_KEY = 'onShiftEngineerEmail';

/** The escalation rules and the on-shift engineer's address, with defaults where unset or unreadable. */
export async function escalationSettings(db: Db): Promise<EscalationSettings> {
  const byKey = await readSettings(db, [ESCALATION_KEY, ON_SHIFT_EMAIL_KEY]);
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
  db: Db,
  settings: EscalationSettings,
): Promise<{ before: EscalationSettings; after: EscalationSettings }> {
  return inTransaction(db, async (t) => {
    const before = await escalationSettings(t);
    await writeSettingIn(t, ESCALATION_KEY, { rules: settings.rules });
    await writeSettingIn(t, ON_SHIFT_EMAIL_KEY, settings.onShiftEngineerEmail);
    return { before, after: await escalationSettings(t) };
  });
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
export async function listCharacteristicAlarmConfigs(db: Db): Promise<CharacteristicAlarmConfigView[]> {
  const [chars, configs] = await Promise.all([
    Characteristic.findAll({
      attributes: ['id', 'name', 'active', 'assetId'],
      include: [{ model: Asset, attributes: ['name'], required: true }],
      order: [['name', 'ASC']],
      ...txOpt(db),
    }),
    AlarmConfig.findAll({ where: { channelId: null }, include: EDITOR(), ...txOpt(db) }),
  ]);
  const byChar = new Map(configs.map((c) => [c.characteristicId!, c as ConfigWithEditor]));
  return chars.map((ch) => {
    const c = ch as Characteristic & { Asset: { name: string } };
    const cfg = byChar.get(c.id);
    return {
      characteristicId: c.id,
      name: c.name,
      assetName: c.Asset.name,
      active: c.active,
      config: cfg
        ? {
            enabled: cfg.enabled,
            priority: cfg.priority as AlarmPriority,
            note: cfg.note,
            updatedAtMs: cfg.updatedAt.getTime(),
            updatedBy: cfg.editor?.displayName ?? null,
          }
        : null,
    };
  });
}

/** A characteristic's alarm settings, or null when it has none. */
export async function characteristicAlarmConfig(q: AnyDb, characteristicId: number): Promise<CharacteristicAlarmConfig | null> {
  if (isDb(q)) {
    const r = await AlarmConfig.findOne({
      where: { characteristicId },
      attributes: ['enabled', 'priority', 'note'],
      ...txOpt(q),
    });
    return r ? { enabled: r.enabled, priority: r.priority as AlarmPriority, note: r.note } : null;
  }
  const rows = await select<CharacteristicAlarmConfig>(
    q,
    `select enabled, priority, note from alarm_configs where characteristic_id = $1`,
    [characteristicId],
  );
  return rows[0] ?? null;
}

export async function characteristicExists(db: Db, characteristicId: number): Promise<boolean> {
  return (await Characteristic.count({ where: { id: characteristicId }, ...txOpt(db) })) > 0;
}

/** Insert or replace a characteristic's alarm settings; returns before (null if new) and after. */
export async function upsertCharacteristicAlarmConfig(
  db: Db,
  characteristicId: number,
  input: CharacteristicAlarmConfig,
  userId: number | null,
): Promise<{ before: CharacteristicAlarmConfig | null; after: CharacteristicAlarmConfig }> {
  return inTransaction(db, async (t) => {
    await execute(t, `select pg_advisory_xact_lock(hashtext('alarm_configs'), $1)`, [-characteristicId]);
    const row = await AlarmConfig.findOne({ where: { characteristicId }, transaction: t, lock: t.LOCK.UPDATE });
    const before = row ? { enabled: row.enabled, priority: row.priority as AlarmPriority, note: row.note } : null;
    const fields = {
      enabled: input.enabled,
      priority: input.priority,
      note: input.note ?? null,
      updatedAt: new Date(),
      updatedBy: userId,
    };
    if (row) await row.update(fields, { transaction: t });
    else
      await AlarmConfig.create(
        { ...fields, characteristicId, channelId: null, high: null, low: null, label: null, staleSeconds: null },
        { transaction: t },
      );
    return { before, after: (await characteristicAlarmConfig(t, characteristicId))! };
  });
}
