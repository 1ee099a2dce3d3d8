/**
 * Example alarm settings for the demo plant, so the simulator's trickle of faults (viscosity
 * drift, a door opened mid-soak, a thermocouple dropping out) turns into alarms:
 *
 * - hard-coat bath viscosity: high 12.5 mm²/s, low 6 mm²/s, deadband 0.2 mm²/s, on-delay 30 s (medium);
 * - hard-coat bath temperature: 10–14 °C, deadband 0.2 °C, on-delay 30 s (medium);
 * - withdrawal speed: ± 0.15 mm/s of the process window's target, on-delay 5 s (high);
 * - oven door open (value 1) while the oven runs (setpoint ≥ 50 °C), on-delay 10 s:
 *   "Oven door open during cure" (medium);
 * - oven zone air temperature: no reading for 60 s while the oven runs (high).
 *
 * These are example defaults — replace them with the lacquer maker's data and the lab's own
 * validation. Idempotent: a channel that already has settings (e.g. edited by an engineer) is
 * left alone.
 */
import { Op, type Sequelize } from 'sequelize';
import { AlarmConfig, Asset, Channel, initModels } from '../db/models/index.ts';

const NOTE = "Example default — replace with the lacquer maker's data.";

interface DefaultConfig {
  /** Channel key and asset-code pattern (SQL LIKE) it applies to. */
  channelKey: string;
  assetLike: string;
  limitsMode?: 'absolute' | 'target-offset';
  high?: number | null;
  low?: number | null;
  deadband?: number;
  onDelayMs?: number;
  offDelayMs?: number;
  priority?: 'high' | 'medium' | 'low';
  onlyWhileRunning?: boolean;
  label?: string | null;
  staleSeconds?: number | null;
  stalePriority?: 'high' | 'medium' | 'low';
}

export const ALARM_DEFAULTS: readonly DefaultConfig[] = [
  { channelKey: 'viscosity', assetLike: 'dip-%-hc', high: 12.5, low: 6, deadband: 0.2, onDelayMs: 30_000, priority: 'medium' },
  { channelKey: 'bath-temp', assetLike: 'dip-%-hc', high: 14, low: 10, deadband: 0.2, onDelayMs: 30_000, priority: 'medium' },
  {
    channelKey: 'withdrawal-speed',
    assetLike: 'dip-%-hc',
    limitsMode: 'target-offset',
    high: 0.15,
    low: -0.15,
    deadband: 0.02,
    onDelayMs: 5_000,
    priority: 'high',
  },
  {
    channelKey: 'door',
    assetLike: 'oven-_',
    high: 0.5,
    onDelayMs: 10_000,
    priority: 'medium',
    onlyWhileRunning: true,
    label: 'Oven door open during cure',
  },
  { channelKey: 'air-temp', assetLike: 'oven-_-z_', staleSeconds: 60, stalePriority: 'high' },
];

export async function seedAlarmDefaults(sequelize: Sequelize, opts: { log?: (s: string) => void } = {}): Promise<number> {
  initModels(sequelize);
  let made = 0;
  for (const d of ALARM_DEFAULTS) {
    const channels = await Channel.findAll({
      attributes: ['id'],
      where: { key: d.channelKey },
      include: [{ model: Asset, attributes: [], required: true, where: { code: { [Op.like]: d.assetLike } } }],
    });
    for (const ch of channels) {
      // A channel that already has settings keeps them (the engineer's or an earlier seed's).
      const [, created] = await AlarmConfig.findOrCreate({
        where: { channelId: ch.id },
        defaults: {
          channelId: ch.id,
          characteristicId: null,
          enabled: true,
          limitsMode: d.limitsMode ?? 'absolute',
          high: d.high ?? null,
          low: d.low ?? null,
          deadband: d.deadband ?? 0,
          onDelayMs: d.onDelayMs ?? 0,
          offDelayMs: d.offDelayMs ?? 0,
          priority: d.priority ?? 'medium',
          onlyWhileRunning: d.onlyWhileRunning ?? false,
          label: d.label ?? null,
          staleSeconds: d.staleSeconds ?? null,
          stalePriority: d.stalePriority ?? 'high',
          note: NOTE,
          updatedBy: null,
        },
      });
      if (created) made += 1;
    }
  }
  if (made > 0) opts.log?.(`Seeded ${made} example alarm settings (replace with the lacquer maker's data).`);
  return made;
}
