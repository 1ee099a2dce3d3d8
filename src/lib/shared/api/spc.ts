/**
 * Answers of the SPC endpoints: stateless evaluation, characteristics, control-chart data, studies and limit sets.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

export const SpcLimitsSchema = z.object({
  center: z.number(),
  ucl: z.number(),
  lcl: z.number(),
});

export const SpcIntervalSchema = z.object({
  lower: z.number(),
  upper: z.number(),
  confidence: z.number(),
});

export const SpcPpmSchema = z.object({
  belowLsl: z.number().nullable(),
  aboveUsl: z.number().nullable(),
  total: z.number(),
});

export const SpcNormalitySchema = z.object({
  method: z.literal('anderson-darling'),
  n: z.number(),
  a2: z.number(),
  a2Adjusted: z.number(),
  pValue: z.number(),
  normalAt5Percent: z.boolean(),
});

export const SpcAutocorrelationSchema = z.object({
  n: z.number(),
  lag1: z.number(),
  threshold: z.number(),
  warning: z.string().nullable(),
});

export const SpcCapabilitySchema = z.object({
  lsl: z.number().nullable(),
  usl: z.number().nullable(),
  target: z.number().nullable(),
  n: z.number(),
  mean: z.number(),
  sigmaWithin: z.number(),
  sigmaOverall: z.number(),
  cp: z.number().nullable(),
  cpk: z.number().nullable(),
  cpu: z.number().nullable(),
  cpl: z.number().nullable(),
  pp: z.number().nullable(),
  ppk: z.number().nullable(),
  ppu: z.number().nullable(),
  ppl: z.number().nullable(),
  cpm: z.number().nullable(),
  cpInterval: SpcIntervalSchema.nullable(),
  cpkInterval: SpcIntervalSchema.nullable(),
  ppmWithin: SpcPpmSchema.nullable(),
  ppmOverall: SpcPpmSchema.nullable(),
  normality: SpcNormalitySchema.nullable(),
  autocorrelation: SpcAutocorrelationSchema.nullable(),
});

export const SpcSuggestedExclusionSchema = z.object({
  index: z.number(),
  iteration: z.number(),
  reason: z.string(),
});

export const SpcParametersSchema = z.object({
  center: z.number(),
  sigma: z.number().nullable(),
  centerSource: z.enum(['given', 'phase1']),
  sigmaSource: z.enum(['given', 'phase1']).nullable(),
  subgroupSize: z.number(),
  lambda: z.number().optional(),
  L: z.number().optional(),
  ewmaLimits: z.enum(['exact', 'asymptotic']).optional(),
  k: z.number().optional(),
  h: z.number().optional(),
  K: z.number().optional(),
  H: z.number().optional(),
  headStart: z.number().optional(),
});

/** What `evaluateSpc` answers (`src/lib/domain/spc/evaluate.ts`). */
export const SpcEvaluateOutputSchema = z.object({
  chart: z.enum(['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum', 'p', 'np', 'c', 'u']),
  limits: SpcLimitsSchema,
  dispersion: SpcLimitsSchema.nullable(),
  sigmaWithin: z.number().nullable(),
  points: z.array(
    z.object({
      index: z.number(),
      value: z.number(),
      center: z.number(),
      ucl: z.number(),
      lcl: z.number(),
      dispersionValue: z.number().nullable(),
      violations: z.array(
        z.enum([
          'we1',
          'we2',
          'we3',
          'we4',
          'nelson1',
          'nelson2',
          'nelson3',
          'nelson4',
          'nelson5',
          'nelson6',
          'nelson7',
          'nelson8',
          'dispersion-ucl',
          'dispersion-lcl',
          'ewma-upper',
          'ewma-lower',
          'cusum-upper',
          'cusum-lower',
        ]),
      ),
      inPhase1: z.boolean(),
      size: z.number(),
      observation: z.number().optional(),
      cPlus: z.number().optional(),
      cMinus: z.number().optional(),
      nPlus: z.number().optional(),
      nMinus: z.number().optional(),
      shiftEstimate: z.number().nullable().optional(),
    }),
  ),
  capability: SpcCapabilitySchema.nullable(),
  phase1: z
    .object({
      first: z.number(),
      last: z.number(),
      suggestedExclusions: z.array(SpcSuggestedExclusionSchema),
    })
    .nullable(),
  parameters: SpcParametersSchema,
  rules: z.array(
    z.enum(['we1', 'we2', 'we3', 'we4', 'nelson1', 'nelson2', 'nelson3', 'nelson4', 'nelson5', 'nelson6', 'nelson7', 'nelson8']),
  ),
  notes: z.array(z.string()),
});

/** What `characteristicSummaries` (one element) answers (`src/lib/server/services/spc.ts`). */
export const CharacteristicSummarySchema = z.object({
  limitsVersion: z.number().nullable(),
  limitsEffectiveFrom: z.string().nullable(),
  draftCount: z.number(),
  points: z.number(),
  lastPoint: z
    .object({
      tMs: z.number(),
      value: z.number(),
      violations: z.array(z.string()),
    })
    .nullable(),
  recentViolations: z.number(),
  id: z.number(),
  assetId: z.number(),
  assetName: z.string(),
  channels: z.array(
    z.object({
      id: z.number(),
      name: z.string(),
      unit: z.string(),
      assetId: z.number(),
    }),
  ),
  createdAt: z.string(),
  updatedAt: z.string(),
  name: z.string(),
  description: z.string(),
  channelIds: z.array(z.number()),
  subgroupRule: z.union([
    z.object({
      kind: z.literal('per-dip-stroke'),
    }),
    z.object({
      kind: z.literal('per-oven-load'),
    }),
    z.object({
      kind: z.literal('per-n-minutes'),
      minutes: z.number(),
      mode: z.enum(['first', 'means']),
    }),
    z.object({
      kind: z.literal('per-manual-check'),
      minSpacingMinutes: z.number(),
    }),
  ]),
  subgroupSize: z.number(),
  chart: z.enum(['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum']),
  chartParams: z.object({
    lambda: z.number().optional(),
    L: z.number().optional(),
    limits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().optional(),
    h: z.number().optional(),
    headStart: z.number().optional(),
    sigmaBasis: z.enum(['within', 'overall']).optional(),
  }),
  rules: z.array(
    z.enum(['we1', 'we2', 'we3', 'we4', 'nelson1', 'nelson2', 'nelson3', 'nelson4', 'nelson5', 'nelson6', 'nelson7', 'nelson8']),
  ),
  spec: z.union([
    z.object({
      mode: z.literal('fixed'),
      lsl: z.number().optional(),
      usl: z.number().optional(),
      target: z.number().optional(),
    }),
    z.object({
      mode: z.literal('none'),
    }),
    z.object({
      mode: z.literal('window'),
      key: z.enum(['withdrawalSpeedMmS', 'viscosityMm2S', 'bathTempC', 'roomRhPct', 'cureSetpointC']),
    }),
  ]),
  unit: z.string(),
  active: z.boolean(),
  backfillDays: z.number().optional(),
});

/** What `getCharacteristic` answers (`src/lib/server/services/spc.ts`). */
export const CharacteristicSchema = z.object({
  id: z.number(),
  assetId: z.number(),
  assetName: z.string(),
  channels: z.array(
    z.object({
      id: z.number(),
      name: z.string(),
      unit: z.string(),
      assetId: z.number(),
    }),
  ),
  createdAt: z.string(),
  updatedAt: z.string(),
  name: z.string(),
  description: z.string(),
  channelIds: z.array(z.number()),
  subgroupRule: z.union([
    z.object({
      kind: z.literal('per-dip-stroke'),
    }),
    z.object({
      kind: z.literal('per-oven-load'),
    }),
    z.object({
      kind: z.literal('per-n-minutes'),
      minutes: z.number(),
      mode: z.enum(['first', 'means']),
    }),
    z.object({
      kind: z.literal('per-manual-check'),
      minSpacingMinutes: z.number(),
    }),
  ]),
  subgroupSize: z.number(),
  chart: z.enum(['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum']),
  chartParams: z.object({
    lambda: z.number().optional(),
    L: z.number().optional(),
    limits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().optional(),
    h: z.number().optional(),
    headStart: z.number().optional(),
    sigmaBasis: z.enum(['within', 'overall']).optional(),
  }),
  rules: z.array(
    z.enum(['we1', 'we2', 'we3', 'we4', 'nelson1', 'nelson2', 'nelson3', 'nelson4', 'nelson5', 'nelson6', 'nelson7', 'nelson8']),
  ),
  spec: z.union([
    z.object({
      mode: z.literal('fixed'),
      lsl: z.number().optional(),
      usl: z.number().optional(),
      target: z.number().optional(),
    }),
    z.object({
      mode: z.literal('none'),
    }),
    z.object({
      mode: z.literal('window'),
      key: z.enum(['withdrawalSpeedMmS', 'viscosityMm2S', 'bathTempC', 'roomRhPct', 'cureSetpointC']),
    }),
  ]),
  unit: z.string(),
  active: z.boolean(),
  backfillDays: z.number().optional(),
});

/** What `createCharacteristic` answers (`src/lib/server/services/spc.ts`). */
export const CreatedCharacteristicSchema = CharacteristicSchema;

/** What `updateCharacteristic` answers (`src/lib/server/services/spc.ts`). */
export const UpdatedCharacteristicSchema = CharacteristicSchema;

/** What `limitSetFor` answers (`src/lib/server/services/spc.ts`). */
export const LimitSetViewSchema = z.object({
  id: z.number(),
  characteristicId: z.number(),
  version: z.number(),
  status: z.enum(['draft', 'superseded', 'approved']),
  chart: z.enum(['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum']),
  center: z.number(),
  ucl: z.number(),
  lcl: z.number(),
  dispersion: z
    .object({
      center: z.number(),
      ucl: z.number(),
      lcl: z.number(),
    })
    .nullable(),
  sigma: z.number().nullable(),
  n: z.number(),
  params: z.object({
    lambda: z.number().optional(),
    L: z.number().optional(),
    limits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().optional(),
    h: z.number().optional(),
    headStart: z.number().optional(),
    sigmaBasis: z.enum(['within', 'overall']).optional(),
  }),
  baselineFrom: z.string(),
  baselineTo: z.string(),
  baselineFirstIndex: z.number().nullable(),
  baselineLastIndex: z.number().nullable(),
  baselinePoints: z.number(),
  excluded: z.array(
    z.object({
      index: z.number(),
      reason: z.string(),
    }),
  ),
  suggested: z.array(SpcSuggestedExclusionSchema),
  capability: SpcCapabilitySchema.nullable(),
  note: z.string(),
  effectiveFrom: z.string().nullable(),
  effectiveFromMs: z.number().nullable(),
  approvedSignature: z
    .object({
      userId: z.number(),
      username: z.string(),
      displayName: z.string(),
      meaning: z.string(),
      signedAt: z.string(),
      seeded: z.boolean().optional(),
    })
    .nullable(),
  approvedAt: z.string().nullable(),
  seeded: z.boolean(),
  createdAt: z.string(),
});

export const SpecLimitsSchema = z.object({
  lsl: z.number().optional(),
  usl: z.number().optional(),
  target: z.number().optional(),
});

/** What `chartData` answers (`src/lib/server/services/spc.ts`). */
export const ChartDataSchema = z.object({
  characteristic: CharacteristicSchema,
  points: z.array(
    z.object({
      id: z.number(),
      index: z.number(),
      tMs: z.number(),
      tFromMs: z.number().nullable(),
      value: z.number(),
      observation: z.number(),
      dispersion: z.number().nullable(),
      n: z.number(),
      center: z.number().nullable(),
      ucl: z.number().nullable(),
      lcl: z.number().nullable(),
      violations: z.array(z.string()),
      limitSetId: z.number().nullable(),
      excluded: z.boolean(),
      exclusionReason: z.string().nullable(),
      dipRunId: z.number().nullable(),
      ovenLoadId: z.number().nullable(),
      extra: z.object({
        cPlus: z.number().optional(),
        cMinus: z.number().optional(),
        nPlus: z.number().optional(),
        nMinus: z.number().optional(),
        shiftEstimate: z.number().nullable().optional(),
      }),
    }),
  ),
  limitSets: z.array(LimitSetViewSchema),
  spec: SpecLimitsSchema.nullable(),
  specNote: z.string().nullable(),
  capability: SpcCapabilitySchema.nullable(),
  capabilityBasis: z.string().nullable(),
  totalPoints: z.number(),
  timeZone: z.string(),
});

/** What `pointDetail` answers (`src/lib/server/services/spc.ts`). */
export const PointDetailSchema = z.object({
  characteristicId: z.number(),
  point: z.object({
    id: z.number(),
    index: z.number(),
    tMs: z.number(),
    tFromMs: z.number().nullable(),
    value: z.number(),
    observation: z.number(),
    dispersion: z.number().nullable(),
    n: z.number(),
    center: z.number().nullable(),
    ucl: z.number().nullable(),
    lcl: z.number().nullable(),
    violations: z.array(z.string()),
    limitSetId: z.number().nullable(),
    excluded: z.boolean(),
    exclusionReason: z.string().nullable(),
    dipRunId: z.number().nullable(),
    ovenLoadId: z.number().nullable(),
    extra: z.object({
      cPlus: z.number().optional(),
      cMinus: z.number().optional(),
      nPlus: z.number().optional(),
      nMinus: z.number().optional(),
      shiftEstimate: z.number().nullable().optional(),
    }),
  }),
  members: z.array(z.number()),
  readings: z.array(z.unknown()),
  channels: z.array(
    z.object({
      id: z.number(),
      name: z.string(),
      unit: z.string(),
      assetId: z.number(),
    }),
  ),
  limitSet: LimitSetViewSchema.nullable(),
  dipRuns: z.array(
    z.object({
      id: z.number(),
      dippedAt: z.string(),
      withdrawalSpeedMmS: z.number().nullable(),
    }),
  ),
  ovenLoads: z.array(
    z.object({
      id: z.number(),
      openedAt: z.string(),
      closedAt: z.string().nullable(),
      verdict: z.string().nullable(),
    }),
  ),
});

/** What `trialStudy` answers (`src/lib/server/services/spc.ts`). */
export const TrialStudySchema = z.object({
  characteristicId: z.number(),
  baselineFrom: z.string(),
  baselineTo: z.string(),
  points: z.array(
    z.object({
      id: z.number(),
      index: z.number(),
      tMs: z.number(),
      tFromMs: z.number().nullable(),
      value: z.number(),
      observation: z.number(),
      dispersion: z.number().nullable(),
      n: z.number(),
      center: z.number().nullable(),
      ucl: z.number().nullable(),
      lcl: z.number().nullable(),
      violations: z.array(z.string()),
      limitSetId: z.number().nullable(),
      excluded: z.boolean(),
      exclusionReason: z.string().nullable(),
      dipRunId: z.number().nullable(),
      ovenLoadId: z.number().nullable(),
      extra: z.object({
        cPlus: z.number().optional(),
        cMinus: z.number().optional(),
        nPlus: z.number().optional(),
        nMinus: z.number().optional(),
        shiftEstimate: z.number().nullable().optional(),
      }),
      trialViolations: z.array(z.string()),
      excludedInStudy: z.boolean(),
    }),
  ),
  limits: z.object({
    center: z.number(),
    ucl: z.number(),
    lcl: z.number(),
  }),
  dispersion: z
    .object({
      center: z.number(),
      ucl: z.number(),
      lcl: z.number(),
    })
    .nullable(),
  sigma: z.number().nullable(),
  n: z.number(),
  params: z.object({
    lambda: z.number().optional(),
    L: z.number().optional(),
    limits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().optional(),
    h: z.number().optional(),
    headStart: z.number().optional(),
    sigmaBasis: z.enum(['within', 'overall']).optional(),
  }),
  suggested: z.array(SpcSuggestedExclusionSchema),
  exclusions: z.array(
    z.object({
      index: z.number(),
      reason: z.string(),
    }),
  ),
  capability: SpcCapabilitySchema.nullable(),
  spec: SpecLimitsSchema.nullable(),
  includedPoints: z.number(),
  notes: z.array(z.string()),
  evaluation: z.object({
    parameters: SpcParametersSchema,
    notes: z.array(z.string()),
  }),
});

/** What `draftLimitSet` answers (`src/lib/server/services/spc.ts`). */
export const DraftLimitSetSchema = LimitSetViewSchema;

/** What `approveLimitSet` answers (`src/lib/server/services/spc.ts`). */
export const ApprovedLimitSetSchema = LimitSetViewSchema;

export const CharacteristicSummaryListSchema = z.array(CharacteristicSummarySchema);
export const LimitSetListSchema = z.array(LimitSetViewSchema);
