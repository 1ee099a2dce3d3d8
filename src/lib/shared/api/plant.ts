/**
 * Answers of the plant endpoints: channels, devices, readings, annotations, the floor, refused and unknown MQTT messages.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `createChannel` answers (`src/lib/server/services/plant-setup.ts`). */
export const ChannelViewSchema = z.object({
  id: z.number(),
  name: z.string(),
  key: z.string(),
  kind: z.string(),
  unit: z.string(),
  min: z.number(),
  max: z.number(),
  topic: z.string(),
  deviceId: z.number(),
  assetId: z.number(),
  assetCode: z.string(),
  assetName: z.string(),
});

/** What `listDevices` (one element) answers (`src/lib/server/services/plant-setup.ts`). */
export const DeviceViewSchema = z.object({
  id: z.number(),
  name: z.string(),
  username: z.string(),
  topicPrefix: z.string(),
  enabled: z.boolean(),
  online: z.boolean(),
  lastSeenAt: z.string().nullable(),
  createdAt: z.string(),
  channels: z.number(),
});

/** What `createDevice` answers (`src/lib/server/services/plant-setup.ts`). */
export const DeviceCredentialsSchema = z.object({
  id: z.number(),
  username: z.string(),
  password: z.string(),
  topicPrefix: z.string(),
});

/** What `updateDevice` answers (`src/lib/server/services/plant-setup.ts`). */
export const UpdatedDeviceSchema = DeviceViewSchema;

/** What `queryReadings` answers (`src/lib/core/readings-store.ts`). */
export const ReadingsSchema = z.union([
  z.object({
    channelId: z.number(),
    unit: z.string(),
    from: z.number(),
    to: z.number(),
    mode: z.literal('raw'),
    bucketMs: z.null(),
    points: z.array(
      z.object({
        t: z.number(),
        v: z.number(),
        q: z.number().optional(),
      }),
    ),
  }),
  z.object({
    channelId: z.number(),
    unit: z.string(),
    from: z.number(),
    to: z.number(),
    mode: z.literal('bucketed'),
    bucketMs: z.number(),
    source: z.enum(['raw', 'minute', 'hour']),
    buckets: z.array(
      z.object({
        t: z.number(),
        min: z.number(),
        max: z.number(),
        mean: z.number(),
        n: z.number(),
      }),
    ),
  }),
]);

export const RangeSchema = z.object({
  min: z.number(),
  max: z.number(),
  target: z.number().optional(),
});

/** What `channelAnnotations` answers (`src/lib/server/services/trend.ts`). */
export const AnnotationsSchema = z.object({
  channelId: z.number(),
  from: z.number(),
  to: z.number(),
  windows: z.array(
    z.object({
      fromMs: z.number(),
      toMs: z.number(),
      window: z
        .object({
          id: z.number(),
          version: z.number(),
          name: z.string(),
          limits: z.object({
            withdrawalSpeedMmS: RangeSchema.optional(),
            viscosityMm2S: RangeSchema.optional(),
            bathTempC: RangeSchema.optional(),
            roomRhPct: z
              .object({
                min: z.number(),
                max: z.number(),
              })
              .optional(),
            flashOffMin: z
              .object({
                min: z.number(),
                max: z.number(),
              })
              .optional(),
            cureSetpointC: RangeSchema.optional(),
            minCureTempC: z.number(),
            minEquivalentMinutes: z.number(),
            referenceC: z.number(),
            activationEnergyKJMol: z.number(),
            maxPartTempC: z.number(),
            maxRampCPerMin: z.number().optional(),
            targetDryThicknessUm: z.number().optional(),
            maxGapSeconds: z.number().optional(),
          }),
          effectiveFrom: z.string(),
        })
        .nullable(),
    }),
  ),
  events: z.array(
    z.object({
      tMs: z.number(),
      kind: z.enum(['alarm', 'solvent-addition', 'lacquer-addition', 'filter-change', 'door-open', 'load-start', 'load-end']),
      label: z.string(),
      detail: z.string().optional(),
      priority: z.enum(['high', 'medium', 'low']).optional(),
    }),
  ),
  truncated: z.boolean(),
});

/** What `floorSnapshot` answers (`src/lib/server/services/floor.ts`). */
export const FloorSnapshotSchema = z.object({
  siteName: z.string(),
  timeZone: z.string(),
  atMs: z.number(),
  tiles: z.array(
    z.object({
      id: z.number(),
      code: z.string(),
      name: z.string(),
      kind: z.enum(['line', 'oven', 'coater']),
      channels: z.array(
        z.object({
          id: z.number(),
          name: z.string(),
          shortName: z.string(),
          kind: z.string(),
          unit: z.string(),
          min: z.number(),
          max: z.number(),
          assetId: z.number(),
          deviceId: z.number(),
          window: z
            .object({
              min: z.number(),
              max: z.number(),
              target: z.number().optional(),
              lowApplies: z.enum(['always', 'load', 'soak']),
              label: z.string(),
            })
            .nullable(),
          windowName: z.string().nullable(),
          latest: z
            .object({
              tMs: z.number(),
              value: z.number(),
            })
            .nullable(),
          alarms: z.number(),
          alarmPriority: z.enum(['high', 'medium', 'low']).nullable(),
        }),
      ),
      deviceIds: z.array(z.number()),
      alarms: z.array(
        z.object({
          id: z.number(),
          priority: z.enum(['high', 'medium', 'low']),
          state: z.string(),
          message: z.string(),
          raisedAtMs: z.number(),
          channelId: z.number().nullable(),
        }),
      ),
      alarmCount: z.number(),
      shelvedCount: z.number(),
      load: z
        .object({
          id: z.number(),
          openedAtMs: z.number(),
          phase: z.enum(['soak', 'idle', 'ramp', 'cool']),
          soakStartMs: z.number().nullable(),
          predictedEndMs: z.number().nullable(),
          setpointC: z.number().nullable(),
          jobs: z.number(),
        })
        .nullable(),
    }),
  ),
  devices: z.array(
    z.object({
      id: z.number(),
      name: z.string(),
      username: z.string(),
      online: z.boolean(),
      lastSeenMs: z.number().nullable(),
    }),
  ),
});

/** What `listRejections` answers (`src/lib/server/services/ingest.ts`). */
export const RejectionsSchema = z.object({
  items: z.array(
    z.object({
      id: z.number(),
      receivedAtMs: z.number(),
      topic: z.string(),
      deviceUsername: z.string().nullable(),
      channelId: z.number().nullable(),
      reason: z.enum([
        'malformed-json',
        'schema',
        'topic',
        'unknown-device',
        'unknown-asset',
        'unknown-channel',
        'out-of-range',
        'wrong-unit',
        'future-timestamp',
        'too-old',
        'duplicate',
      ]),
      detail: z.string().nullable(),
      payload: z.string(),
    }),
  ),
  nextBefore: z.number().nullable(),
});

/** What `listUnknownChannels` (one element) answers (`src/lib/server/services/ingest.ts`). */
export const UnknownChannelSchema = z.object({
  id: z.number(),
  deviceId: z.number(),
  deviceUsername: z.string(),
  topic: z.string(),
  assetCode: z.string(),
  channelKey: z.string(),
  firstSeenMs: z.number(),
  lastSeenMs: z.number(),
  messages: z.number(),
  samplePayload: z.string().nullable(),
  resolvedAtMs: z.number().nullable(),
  resolution: z.string().nullable(),
});

/** One asset of the plant tree (`parentId` makes the tree: site → line → tank, oven → zone). */
export const AssetViewSchema = z.object({
  id: z.number(),
  siteId: z.number(),
  parentId: z.number().nullable(),
  kind: z.string(),
  code: z.string(),
  name: z.string(),
});
export const AssetListSchema = z.array(AssetViewSchema);
export const ChannelListSchema = z.array(ChannelViewSchema);
export const DeviceListSchema = z.array(DeviceViewSchema);
export const UnknownChannelListSchema = z.object({ items: z.array(UnknownChannelSchema) });
