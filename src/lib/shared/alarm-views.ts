/**
 * What the alarm API returns and accepts beyond the request schemas of `alarms.ts`: the alarm
 * and event views (shared by the API, the live `alarms` events and the islands), the list
 * query, and the alarm settings (per-channel limit / stale-data configs, escalation rules,
 * the on-shift engineer's address). Pure: no server imports.
 */
import { z } from 'zod';
import {
  ALARM_PRIORITIES,
  ALARM_STATES,
  AlarmPrioritySchema,
  EscalationRuleSchema,
  LIMIT_DELAY_MAX_MS,
  type AlarmPriority,
  type AlarmState,
  type EscalationStep,
} from './alarms.ts';

/** Where an alarm comes from. */
export const ALARM_SOURCE_KINDS = ['limit', 'spc', 'cure', 'stale', 'device', 'system'] as const;
export type AlarmSourceKind = (typeof ALARM_SOURCE_KINDS)[number];

/** Plain words for each source kind. */
export const SOURCE_KIND_LABELS: Readonly<Record<AlarmSourceKind, string>> = {
  limit: 'Process limit',
  spc: 'Control chart',
  cure: 'Cure verdict',
  stale: 'No data',
  device: 'Device offline',
  system: 'System',
};

/** One alarm as the API, the live stream and the queue see it (times in epoch ms). */
export interface AlarmView {
  id: number;
  sourceKind: AlarmSourceKind;
  sourceKey: string;
  sourceLabel: string;
  assetId: number | null;
  assetName: string | null;
  channelId: number | null;
  characteristicId: number | null;
  loadId: number | null;
  priority: AlarmPriority;
  message: string;
  value: number | null;
  limit: number | null;
  state: AlarmState;
  /** The process condition: still abnormal. */
  active: boolean;
  raisedAtMs: number;
  lastActivatedAtMs: number;
  clearedAtMs: number | null;
  ackedAtMs: number | null;
  ackedBy: string | null;
  shelvedUntilMs: number | null;
  escalationStepsSent: number[];
  /** How many times the condition activated on this alarm (chattering shows here). */
  activationCount: number;
  updatedAtMs: number;
}

/** One transition of an alarm. */
export interface AlarmEventView {
  id: number;
  atMs: number;
  event: string;
  fromState: AlarmState | null;
  toState: AlarmState;
  active: boolean;
  userId: number | null;
  userName: string | null;
  comment: string | null;
}

/** Plain words for alarm events in the history. */
export const EVENT_LABELS: Readonly<Record<string, string>> = {
  activate: 'Condition became abnormal',
  clear: 'Condition returned to normal',
  ack: 'Acknowledged',
  shelve: 'Shelved',
  unshelve: 'Unshelved',
  'shelf-expired': 'Shelf ended',
  suppress: 'Suppressed by design',
  unsuppress: 'Suppression ended',
  'remove-from-service': 'Taken out of service',
  'return-to-service': 'Returned to service',
  escalate: 'Escalation sent',
};

/** Most alarms one list request returns. */
export const ALARM_LIST_MAX = 500;

const csv = <T extends string>(values: readonly [T, ...T[]], what: string) =>
  z
    .string()
    .trim()
    .optional()
    .transform((s, ctx) => {
      if (!s) return [] as T[];
      const parts = s
        .split(',')
        .map((p) => p.trim())
        .filter(Boolean);
      const bad = parts.filter((p) => !(values as readonly string[]).includes(p));
      if (bad.length > 0) {
        ctx.addIssue({ code: 'custom', message: `unknown ${what} ${bad.join(', ')}; use ${values.join(', ')}` });
        return z.NEVER;
      }
      return parts as T[];
    });

/**
 * Query of `GET /api/v1/alarms`: `state` (comma-separated ISA state names, or `open` = the
 * annunciated states), `priority` (comma-separated), `channel`, `limit` (1–500, default 200).
 */
export const AlarmListQuerySchema = z.object({
  state: csv([...ALARM_STATES, 'open'] as [AlarmState | 'open', ...(AlarmState | 'open')[]], 'state'),
  priority: csv([...ALARM_PRIORITIES], 'priority'),
  channel: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(ALARM_LIST_MAX).default(200),
});
export type AlarmListQuery = z.infer<typeof AlarmListQuerySchema>;

/** Query of `GET /api/v1/alarms/kpi`: period `from`/`to` (ISO date-time or epoch ms), optional `format=csv`. */
export const AlarmKpiQuerySchema = z
  .object({
    from: z.union([z.coerce.number().int(), z.iso.datetime({ offset: true })]).optional(),
    to: z.union([z.coerce.number().int(), z.iso.datetime({ offset: true })]).optional(),
    positions: z.coerce.number().int().min(1).max(50).default(1),
    format: z.enum(['json', 'csv']).default('json'),
  })
  .transform((q) => {
    const toMs = q.to === undefined ? null : typeof q.to === 'number' ? q.to : Date.parse(q.to);
    const fromMs = q.from === undefined ? null : typeof q.from === 'number' ? q.from : Date.parse(q.from);
    return { ...q, fromMs, toMs };
  })
  .refine((q) => q.fromMs === null || q.toMs === null || q.fromMs < q.toMs, {
    message: 'from must be before to',
    path: ['from'],
  })
  .refine((q) => q.fromMs === null || q.toMs === null || q.toMs - q.fromMs <= 92 * 86_400_000, {
    message: 'at most 92 days at once',
    path: ['to'],
  });

// ---------------------------------------------------------------------------------------------
// Settings
// ---------------------------------------------------------------------------------------------

/** How a channel's limits are read: absolute values, or offsets from the process window's target. */
export const LIMITS_MODES = ['absolute', 'target-offset'] as const;
export type LimitsMode = (typeof LIMITS_MODES)[number];

const optNumber = z.number().nullable().optional();

/**
 * Body of `PUT /api/v1/alarm-configs/{channelId}`: the alarm settings of one channel.
 * - limit alarm: `high`/`low` in the channel unit (or, with `limitsMode: 'target-offset'`,
 *   offsets from the window's target, e.g. low −0.15 high +0.15), `deadband`, `onDelayMs`,
 *   `offDelayMs`, `priority`; both limits empty = no limit alarm on this channel;
 * - `onlyWhileRunning`: evaluate only while the asset runs (an oven at a setpoint ≥ 50 °C);
 * - `label`: the alarm's wording instead of the generated one (e.g. 'Oven door open during cure');
 * - `staleSeconds` / `stalePriority`: no reading for that long raises a "no data" alarm;
 * - `note`: where the values come from.
 */
export const AlarmConfigInputSchema = z
  .object({
    enabled: z.boolean(),
    limitsMode: z.enum(LIMITS_MODES).default('absolute'),
    high: optNumber,
    low: optNumber,
    deadband: z.number().min(0, 'deadband cannot be negative').default(0),
    onDelayMs: z.number().int().min(0).max(LIMIT_DELAY_MAX_MS).default(0),
    offDelayMs: z.number().int().min(0).max(LIMIT_DELAY_MAX_MS).default(0),
    priority: AlarmPrioritySchema.default('medium'),
    onlyWhileRunning: z.boolean().default(false),
    label: z.string().trim().max(120).nullable().optional(),
    staleSeconds: z.number().int().min(5, 'at least 5 s').max(86_400, 'at most 24 h').nullable().optional(),
    stalePriority: AlarmPrioritySchema.default('high'),
    note: z.string().trim().max(500).nullable().optional(),
  })
  .refine((c) => c.high == null || c.low == null || c.low < c.high, {
    message: 'the low limit must be below the high limit',
    path: ['low'],
  });
export type AlarmConfigInput = z.infer<typeof AlarmConfigInputSchema>;

/** One channel with its alarm settings (null when it has none). */
export interface ChannelAlarmConfigView {
  channelId: number;
  channelName: string;
  channelKind: string;
  unit: string;
  assetId: number;
  assetName: string;
  config: (AlarmConfigInput & { id: number; updatedAtMs: number; updatedBy: string | null }) | null;
}

/** Escalation rules for every priority (a priority without steps never escalates). */
export const EscalationSettingsSchema = z.object({
  rules: z
    .array(EscalationRuleSchema)
    .max(3)
    .refine((rules) => new Set(rules.map((r) => r.priority)).size === rules.length, 'one rule per priority'),
  onShiftEngineerEmail: z.email('an e-mail address').max(200),
});
export type EscalationSettings = z.infer<typeof EscalationSettingsSchema>;

/** Default on-shift engineer's address (the demo engineer). */
export const DEFAULT_ON_SHIFT_ENGINEER_EMAIL = 'engineer@fernhollow.example';

/** Default escalation: high alarms unacknowledged 10 min go to the on-shift engineer (our own choice). */
export const DEFAULT_ESCALATION: Readonly<Partial<Record<AlarmPriority, readonly EscalationStep[]>>> = {
  high: [{ afterMinutes: 10, notify: 'on-shift-engineer' }],
};

// ---------------------------------------------------------------------------------------------
// Rules of the worker's alarm sources (shown on the settings screen; our own choices)
// ---------------------------------------------------------------------------------------------

/** An oven (and its zones) runs while its setpoint is at or above this, °C. */
export const OVEN_RUNNING_SETPOINT_C = 50;
/** A channel that is not an oven's counts as running when it had data this recently, ms. */
export const RECENT_DATA_MS = 3_600_000;
/** A device offline for longer than this raises an alarm, ms. */
export const DEVICE_OFFLINE_MS = 60_000;
/** Ingest lag that raises a system alarm, and the lag below which it clears, ms. */
export const LAG_RAISE_MS = 10_000;
export const LAG_CLEAR_MS = 5_000;
/** Limits for a channel without its own: the process window in force, with these settings. */
export const WINDOW_FALLBACK: Readonly<{
  deadbandFraction: number;
  onDelayMs: number;
  offDelayMs: number;
  priority: AlarmPriority;
}> = {
  deadbandFraction: 0.02,
  onDelayMs: 10_000,
  offDelayMs: 0,
  priority: 'medium',
};

// ---------------------------------------------------------------------------------------------
// Control-chart (SPC) alarms per characteristic
// ---------------------------------------------------------------------------------------------

/**
 * Body of `PUT /api/v1/alarm-configs/characteristics/{id}`: whether a characteristic's
 * control-chart violations raise alarms, and at which priority (default when unset: on, medium).
 */
export const CharacteristicAlarmConfigSchema = z.object({
  enabled: z.boolean(),
  priority: AlarmPrioritySchema,
  note: z.string().trim().max(500).nullable().optional(),
});
export type CharacteristicAlarmConfig = z.infer<typeof CharacteristicAlarmConfigSchema>;

/** One characteristic with its alarm settings (null = the defaults: on, priority as raised). */
export interface CharacteristicAlarmConfigView {
  characteristicId: number;
  name: string;
  assetName: string;
  active: boolean;
  config: (CharacteristicAlarmConfig & { updatedAtMs: number; updatedBy: string | null }) | null;
}
