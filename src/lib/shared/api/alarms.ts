/**
 * Answers of the alarm endpoints: alarms and their transitions, bulk acknowledgement, health figures, alarm settings.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `applyAlarmEvent` answers (`src/lib/server/services/alarms.ts`). */
export const AlarmViewSchema = z.object({
  id: z.number(),
  sourceKind: z.enum(['limit', 'spc', 'cure', 'stale', 'device', 'system']),
  sourceKey: z.string(),
  sourceLabel: z.string(),
  assetId: z.number().nullable(),
  assetName: z.string().nullable(),
  channelId: z.number().nullable(),
  characteristicId: z.number().nullable(),
  loadId: z.number().nullable(),
  priority: z.enum(['high', 'medium', 'low']),
  message: z.string(),
  value: z.number().nullable(),
  limit: z.number().nullable(),
  state: z.enum(['normal', 'unacked', 'acked', 'rtn-unacked', 'shelved', 'suppressed', 'out-of-service']),
  active: z.boolean(),
  raisedAtMs: z.number(),
  lastActivatedAtMs: z.number(),
  clearedAtMs: z.number().nullable(),
  ackedAtMs: z.number().nullable(),
  ackedBy: z.string().nullable(),
  shelvedUntilMs: z.number().nullable(),
  escalationStepsSent: z.array(z.number()),
  activationCount: z.number(),
  updatedAtMs: z.number(),
});

/** What `alarmWithEvents` answers (`src/lib/server/services/alarms.ts`). */
export const AlarmWithEventsSchema = z.object({
  events: z.array(
    z.object({
      id: z.number(),
      atMs: z.number(),
      event: z.string(),
      fromState: z.enum(['normal', 'unacked', 'acked', 'rtn-unacked', 'shelved', 'suppressed', 'out-of-service']).nullable(),
      toState: z.enum(['normal', 'unacked', 'acked', 'rtn-unacked', 'shelved', 'suppressed', 'out-of-service']),
      active: z.boolean(),
      userId: z.number().nullable(),
      userName: z.string().nullable(),
      comment: z.string().nullable(),
    }),
  ),
  id: z.number(),
  sourceKind: z.enum(['limit', 'spc', 'cure', 'stale', 'device', 'system']),
  sourceKey: z.string(),
  sourceLabel: z.string(),
  assetId: z.number().nullable(),
  assetName: z.string().nullable(),
  channelId: z.number().nullable(),
  characteristicId: z.number().nullable(),
  loadId: z.number().nullable(),
  priority: z.enum(['high', 'medium', 'low']),
  message: z.string(),
  value: z.number().nullable(),
  limit: z.number().nullable(),
  state: z.enum(['normal', 'unacked', 'acked', 'rtn-unacked', 'shelved', 'suppressed', 'out-of-service']),
  active: z.boolean(),
  raisedAtMs: z.number(),
  lastActivatedAtMs: z.number(),
  clearedAtMs: z.number().nullable(),
  ackedAtMs: z.number().nullable(),
  ackedBy: z.string().nullable(),
  shelvedUntilMs: z.number().nullable(),
  escalationStepsSent: z.array(z.number()),
  activationCount: z.number(),
  updatedAtMs: z.number(),
});

/** What `bulkAck` answers (`src/lib/server/services/alarms.ts`). */
export const BulkAckResultSchema = z.object({
  acknowledged: z.array(AlarmViewSchema),
  refused: z.array(
    z.object({
      id: z.number(),
      status: z.number(),
      reason: z.string(),
    }),
  ),
});

/** What `AlarmHealth` answers (`src/lib/server/services/alarms.ts`). */
export const AlarmKpiReportSchema = z.object({
  report: z.object({
    window: z.object({
      fromMs: z.number(),
      toMs: z.number(),
      durationMs: z.number(),
      operatorPositions: z.number(),
    }),
    totalAlarms: z.number(),
    rate: z.object({
      averagePer10MinPerPosition: z.number(),
      averagePerHourPerPosition: z.number(),
      averagePerDayPerPosition: z.number(),
      peak10MinCount: z.number(),
      peak10MinStartMs: z.number().nullable(),
      peak10MinPerPosition: z.number(),
      band: z.enum(['very-likely-acceptable', 'maximum-manageable', 'over-demanding']),
      benchmark: z.string(),
    }),
    floods: z.object({
      periods: z.array(
        z.object({
          startMs: z.number(),
          endMs: z.number(),
          count: z.number(),
        }),
      ),
      timeInFloodMs: z.number(),
      percentTimeInFlood: z.number(),
    }),
    stale: z.array(
      z.object({
        id: z.union([z.string(), z.number()]),
        source: z.string(),
        priority: z.enum(['high', 'medium', 'low']),
        activatedAtMs: z.number(),
        activeForMs: z.number(),
      }),
    ),
    chattering: z.array(
      z.object({
        source: z.string(),
        maxIn60s: z.number(),
        firstAtMs: z.number(),
        activations: z.number(),
      }),
    ),
    topSources: z.array(
      z.object({
        source: z.string(),
        count: z.number(),
        sharePercent: z.number(),
      }),
    ),
    priorities: z.object({
      counts: z.object({
        high: z.number(),
        medium: z.number(),
        low: z.number(),
      }),
      percent: z.object({
        high: z.number(),
        medium: z.number(),
        low: z.number(),
      }),
      commonPracticeTargetPercent: z.object({
        high: z.number(),
        medium: z.number(),
        low: z.number(),
      }),
    }),
  }),
  per10Min: z.array(
    z.object({
      startMs: z.number(),
      count: z.number(),
    }),
  ),
  meanTimeToAckMs: z.number().nullable(),
  log: z.array(
    z.object({
      id: z.string(),
      alarmId: z.number(),
      source: z.string(),
      sourceKind: z.enum(['limit', 'spc', 'cure', 'stale', 'device', 'system']),
      priority: z.enum(['high', 'medium', 'low']),
      activatedAtMs: z.number(),
      clearedAtMs: z.number().nullable(),
      ackedAtMs: z.number().nullable(),
    }),
  ),
});

/** What `listChannelAlarmConfigs` (one element) answers (`src/lib/core/alarm-config-store.ts`). */
export const ChannelAlarmConfigViewSchema = z.object({
  channelId: z.number(),
  channelName: z.string(),
  channelKind: z.string(),
  unit: z.string(),
  assetId: z.number(),
  assetName: z.string(),
  config: z
    .object({
      enabled: z.boolean(),
      limitsMode: z.enum(['absolute', 'target-offset']),
      deadband: z.number(),
      onDelayMs: z.number(),
      offDelayMs: z.number(),
      priority: z.enum(['high', 'medium', 'low']),
      onlyWhileRunning: z.boolean(),
      stalePriority: z.enum(['high', 'medium', 'low']),
      high: z.number().nullable().optional(),
      low: z.number().nullable().optional(),
      label: z.string().nullable().optional(),
      staleSeconds: z.number().nullable().optional(),
      note: z.string().nullable().optional(),
      id: z.number(),
      updatedAtMs: z.number(),
      updatedBy: z.string().nullable(),
    })
    .nullable(),
});

/** What `saveChannelConfig` answers (`src/lib/server/services/alarms.ts`). */
export const ChannelAlarmConfigSchema = z.object({
  id: z.number(),
  channelId: z.number(),
  enabled: z.boolean(),
  limitsMode: z.enum(['absolute', 'target-offset']),
  high: z.number().nullable(),
  low: z.number().nullable(),
  deadband: z.number(),
  onDelayMs: z.number(),
  offDelayMs: z.number(),
  priority: z.enum(['high', 'medium', 'low']),
  onlyWhileRunning: z.boolean(),
  label: z.string().nullable(),
  staleSeconds: z.number().nullable(),
  stalePriority: z.enum(['high', 'medium', 'low']),
  note: z.string().nullable(),
  updatedAtMs: z.number(),
  updatedBy: z.string().nullable(),
});

/** What `listCharacteristicAlarmConfigs` (one element) answers (`src/lib/core/alarm-config-store.ts`). */
export const CharacteristicAlarmConfigViewSchema = z.object({
  characteristicId: z.number(),
  name: z.string(),
  assetName: z.string(),
  active: z.boolean(),
  config: z
    .object({
      enabled: z.boolean(),
      priority: z.enum(['high', 'medium', 'low']),
      note: z.string().nullable().optional(),
      updatedAtMs: z.number(),
      updatedBy: z.string().nullable(),
    })
    .nullable(),
});

/** What `saveCharacteristicConfig` answers (`src/lib/server/services/alarms.ts`). */
export const CharacteristicAlarmConfigAnswerSchema = z.object({
  enabled: z.boolean(),
  priority: z.enum(['high', 'medium', 'low']),
  note: z.string().nullable().optional(),
});

/** What `escalation` answers (`src/lib/server/services/alarms.ts`). */
export const EscalationSchema = z.object({
  rules: z.array(
    z.object({
      priority: z.enum(['high', 'medium', 'low']),
      steps: z.array(
        z.object({
          afterMinutes: z.number(),
          notify: z.string(),
        }),
      ),
    }),
  ),
  onShiftEngineerEmail: z.string(),
});

export const AlarmListSchema = z.array(AlarmViewSchema);
/** `GET /api/v1/alarms/kpi`: the report's figures with the 10-minute series and the mean time to acknowledge. */
export const AlarmKpiSchema = AlarmKpiReportSchema.shape.report.extend({
  per10Min: AlarmKpiReportSchema.shape.per10Min,
  meanTimeToAckMs: AlarmKpiReportSchema.shape.meanTimeToAckMs,
});
export const ChannelAlarmConfigListSchema = z.array(ChannelAlarmConfigViewSchema);
export const CharacteristicAlarmConfigListSchema = z.array(CharacteristicAlarmConfigViewSchema);
