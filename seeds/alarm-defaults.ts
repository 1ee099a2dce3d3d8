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
import type { Sequelize } from 'sequelize';

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
  let made = 0;
  for (const d of ALARM_DEFAULTS) {
    const [rows] = await sequelize.query(
      `insert into alarm_configs (channel_id, enabled, limits_mode, high, low, deadband, on_delay_ms, off_delay_ms, priority,
         only_while_running, label, stale_seconds, stale_priority, note)
       select c.id, true, $1::text, $2::float8, $3::float8, $4::float8, $5::int, $6::int, $7::text, $8::boolean, $9::text,
              $10::int, $11::text, $12::text
         from channels c join assets a on a.id = c.asset_id
        where c.key = $13 and a.code like $14
       on conflict (channel_id) where channel_id is not null do nothing
       returning id`,
      {
        bind: [
          d.limitsMode ?? 'absolute',
          d.high ?? null,
          d.low ?? null,
          d.deadband ?? 0,
          d.onDelayMs ?? 0,
          d.offDelayMs ?? 0,
          d.priority ?? 'medium',
          d.onlyWhileRunning ?? false,
          d.label ?? null,
          d.staleSeconds ?? null,
          d.stalePriority ?? 'high',
          NOTE,
          d.channelKey,
          d.assetLike,
        ],
      },
    );
    made += rows.length;
  }
  if (made > 0) opts.log?.(`Seeded ${made} example alarm settings (replace with the lacquer maker's data).`);
  return made;
}
