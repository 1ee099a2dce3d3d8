/**
 * Answers of the production endpoints: dip runs, job search and import, oven loads and their cure records.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `getDipRun` answers (`src/lib/server/services/dips.ts`). */
export const DipRunSchema = z.object({
  id: z.number(),
  lineCode: z.string(),
  lineName: z.string(),
  dippedAt: z.string(),
  rackCode: z.string().nullable(),
  jobs: z.array(z.string()),
  withdrawalSpeedMmS: z.number().nullable(),
  strokeSamples: z.number().nullable(),
  speedWindow: z
    .object({
      min: z.number(),
      max: z.number(),
      target: z.number().optional(),
    })
    .nullable(),
  bathChargeId: z.number().nullable(),
  lotCode: z.string().nullable(),
  lastCheckAt: z.string().nullable(),
  lastCheckMm2S: z.number().nullable(),
  viscosityWindow: z
    .object({
      min: z.number(),
      max: z.number(),
      target: z.number().optional(),
    })
    .nullable(),
  windowName: z.string().nullable(),
  windowVersion: z.number().nullable(),
  source: z.string(),
  recordedBy: z.string().nullable(),
});

/** What `listDipRuns` answers (`src/lib/server/services/dips.ts`). */
export const DipRunListSchema = z.array(DipRunSchema);

/** What `recordDipRun` answers (`src/lib/server/services/dips.ts`). */
export const RecordedDipRunSchema = z.object({
  id: z.number(),
  lineAssetId: z.number(),
  tankAssetId: z.number().nullable(),
  dippedAt: z.string(),
  bathChargeId: z.number().nullable(),
  lastCheckId: z.number().nullable(),
  windowId: z.number().nullable(),
  withdrawalSpeedMmS: z.number().nullable(),
  strokeSamples: z.number().nullable(),
  jobs: z.array(
    z.object({
      id: z.number(),
      jobNumber: z.string(),
    }),
  ),
  rackId: z.number().nullable(),
  item: DipRunSchema,
});

/** What `searchJobs` (one element) answers (`src/lib/server/services/dips.ts`). */
export const JobSearchItemSchema = z.object({
  jobNumber: z.string(),
  status: z.string(),
  customerRef: z.string().nullable(),
});

/** What `previewJobCsv` answers (`src/lib/server/services/dips.ts`). */
export const JobImportPreviewAnswerSchema = z.object({
  sha256: z.string(),
  existing: z.array(z.string()),
  good: z.array(
    z.object({
      line: z.number(),
      jobNumber: z.string(),
      customerRef: z.string().nullable(),
      lensMaterial: z.string().nullable(),
      rackCode: z.string().nullable(),
    }),
  ),
  bad: z.array(
    z.object({
      line: z.number(),
      errors: z.array(z.string()),
    }),
  ),
  columns: z.record(z.string(), z.string()),
});

/** What `commitJobCsv` answers (`src/lib/server/services/dips.ts`). */
export const JobImportResultSchema = z.object({
  imported: z.number(),
  created: z.number(),
  skippedLines: z.array(z.number()),
  attachedTo: z.number().nullable(),
  jobNumbers: z.array(z.string()),
});

/** What `listLoads` (one element) answers (`src/lib/server/services/loads.ts`). */
export const LoadListItemSchema = z.object({
  id: z.number(),
  ovenAssetId: z.number(),
  ovenCode: z.string(),
  ovenName: z.string(),
  openedAt: z.string(),
  closedAt: z.string().nullable(),
  status: z.enum(['open', 'closed']),
  openedBy: z.enum(['user', 'auto']),
  openedByName: z.string().nullable(),
  verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']).nullable(),
  jobs: z.number(),
  equivalentMinutes: z.number().nullable(),
  peakC: z.number().nullable(),
  minutesAtOrAboveMin: z.number().nullable(),
  doorOpenings: z.number().nullable(),
  gaps: z.number().nullable(),
  windowName: z.string().nullable(),
  windowVersion: z.number().nullable(),
  alarmId: z.number().nullable(),
  phase: z.string().nullable(),
});

export const StoredCureRecordSchema = z.object({
  window: z
    .object({
      id: z.number(),
      version: z.number(),
      name: z.string(),
      lacquer: z.string(),
      substrate: z.string(),
      minTempC: z.number(),
      minEquivalentMinutes: z.number(),
      referenceC: z.number(),
      activationEnergyKJMol: z.number(),
      maxPartTempC: z.number(),
      maxRampCPerMin: z.number(),
      maxGapSeconds: z.number(),
      defaulted: z.array(z.string()),
    })
    .nullable(),
  source: z.object({
    zoneChannels: z.array(
      z.object({
        id: z.number(),
        name: z.string(),
      }),
    ),
    doorChannelId: z.number().nullable(),
    readings: z.number(),
    instants: z.number(),
    badQualityExcluded: z.number(),
  }),
  openedAtMs: z.number(),
  closedAtMs: z.number(),
  durationMinutes: z.number(),
  minutesAtOrAboveMin: z.number().nullable(),
  peakC: z.number().nullable(),
  peakAtMs: z.number().nullable(),
  maxHeatUpCPerMin: z.number().nullable(),
  maxCoolDownCPerMin: z.number().nullable(),
  rampExceeded: z.boolean(),
  equivalentMinutes: z.number().nullable(),
  gaps: z.array(
    z.object({
      startMs: z.number(),
      endMs: z.number(),
      durationS: z.number(),
    }),
  ),
  soak: z
    .object({
      startMs: z.number(),
      endMs: z.number(),
    })
    .nullable(),
  door: z.object({
    openings: z.number(),
    openSeconds: z.number(),
    openingsDuringSoak: z.number(),
    events: z.array(
      z.object({
        openedMs: z.number(),
        closedMs: z.number(),
        durationS: z.number(),
        stillOpen: z.boolean(),
      }),
    ),
  }),
  verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']),
  reasons: z.array(z.string()),
  computedAtMs: z.number(),
});

export const LoadJobSchema = z.object({
  jobId: z.number(),
  jobNumber: z.string(),
  status: z.string(),
  rackCode: z.string().nullable(),
  addedAt: z.string(),
  tests: z.number(),
  failed: z.number(),
});

export const LoadAlarmSchema = z.object({
  id: z.number(),
  priority: z.string(),
  state: z.string(),
  sourceLabel: z.string(),
  message: z.string(),
  raisedAt: z.string(),
  clearedAt: z.string().nullable(),
  ackedBy: z.string().nullable(),
});

export const OpenLoadPhaseSchema = z.object({
  phase: z.string(),
  soakStartMs: z.number().optional(),
  predictedEndMs: z.number().optional(),
  setpointC: z.number().nullable(),
  coldestC: z.number().nullable(),
});

/** What `openLoadByHand` answers (`src/lib/server/services/loads.ts`). */
export const LoadDetailSchema = z.object({
  closedBy: z.enum(['user', 'auto']).nullable(),
  closedByName: z.string().nullable(),
  record: StoredCureRecordSchema.nullable(),
  computedAt: z.string().nullable(),
  note: z.string().nullable(),
  jobList: z.array(LoadJobSchema),
  alarms: z.array(LoadAlarmSchema),
  openPhase: OpenLoadPhaseSchema.nullable(),
  window: z
    .object({
      id: z.number(),
      name: z.string(),
      version: z.number(),
      lacquer: z.string(),
      substrate: z.string(),
    })
    .nullable(),
  id: z.number(),
  ovenAssetId: z.number(),
  ovenCode: z.string(),
  ovenName: z.string(),
  openedAt: z.string(),
  closedAt: z.string().nullable(),
  status: z.enum(['open', 'closed']),
  openedBy: z.enum(['user', 'auto']),
  openedByName: z.string().nullable(),
  verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']).nullable(),
  jobs: z.number(),
  equivalentMinutes: z.number().nullable(),
  peakC: z.number().nullable(),
  minutesAtOrAboveMin: z.number().nullable(),
  doorOpenings: z.number().nullable(),
  gaps: z.number().nullable(),
  windowName: z.string().nullable(),
  windowVersion: z.number().nullable(),
  alarmId: z.number().nullable(),
  phase: z.string().nullable(),
});

/** What `closeLoadByHand` answers (`src/lib/server/services/loads.ts`). */
export const ClosedLoadSchema = LoadDetailSchema;

/** What `addJobs` answers (`src/lib/server/services/loads.ts`). */
export const LoadJobsAddedSchema = z.object({
  added: z.array(z.string()),
  alreadyInLoad: z.array(z.string()),
  unknownRacks: z.array(z.string()),
  fromRacks: z.record(z.string(), z.array(z.string())),
});

/** What `recompute` answers (`src/lib/server/services/loads.ts`). */
export const RecomputeResultSchema = z.object({
  loadId: z.number(),
  verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']),
  record: StoredCureRecordSchema,
  alarmId: z.number().nullable(),
});

export const JobSearchListSchema = z.array(JobSearchItemSchema);
export const LoadListSchema = z.array(LoadListItemSchema);
