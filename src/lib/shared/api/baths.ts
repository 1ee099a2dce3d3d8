/**
 * Answers of the bath endpoints: lots, charges, checks, additions, filter changes and the bath overview.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `createLot` answers (`src/lib/server/services/baths.ts`). */
export const LotSchema = z.object({
  id: z.number(),
  lacquerId: z.number(),
  lacquer: z.string(),
  lotCode: z.string(),
  receivedOn: z.string(),
  expiresOn: z.string(),
  solidsPct: z.number(),
  note: z.string().nullable(),
  createdBy: z.string().nullable(),
  charges: z.number(),
});

/** What `createCharge` answers (`src/lib/server/services/baths.ts`). */
export const ChargeSchema = z.object({
  id: z.number(),
  tankAssetId: z.number(),
  tankCode: z.string(),
  lotId: z.number(),
  lotCode: z.string(),
  lotSolidsPct: z.number(),
  lotExpiresOn: z.string(),
  lacquerId: z.number(),
  lacquer: z.string(),
  lacquerSolidsPct: z.number(),
  densityGCm3: z.number(),
  chargedAt: z.string(),
  massKg: z.number(),
  potLifeDays: z.number(),
  note: z.string().nullable(),
  createdBy: z.string().nullable(),
});

export const RangeSchema = z.object({
  min: z.number(),
  max: z.number(),
  target: z.number().optional(),
});

export const ProcessWindowLimitsAnswerSchema = z.object({
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
});

export const ProcessWindowInForceSchema = z.object({
  id: z.number(),
  version: z.number(),
  name: z.string(),
  lacquer: z.string(),
  substrate: z.string(),
  limits: ProcessWindowLimitsAnswerSchema,
  effectiveFrom: z.string(),
});

/** What `listChecks` (one element) answers (`src/lib/server/services/baths.ts`). */
export const BathCheckSchema = z.object({
  id: z.number(),
  tankAssetId: z.number(),
  tankCode: z.string(),
  at: z.string(),
  by: z.string(),
  cup: z.string().nullable(),
  effluxSeconds: z.number().nullable(),
  measuredMm2S: z.number().nullable(),
  kinematicMm2S: z.number(),
  method: z.string(),
  dynamicMPaS: z.number().nullable(),
  bathTempC: z.number().nullable(),
  solidsPct: z.number().nullable(),
  windowId: z.number().nullable(),
  note: z.string().nullable(),
});

export const BathAdditionSchema = z.object({
  ok: z.literal(true),
  kind: z.enum(['solvent', 'lacquer', 'none']),
  massKg: z.number(),
  resultingBathMassKg: z.number(),
  resultingSolidsPct: z.number(),
});

export const BathAdditionRefusalSchema = z.object({
  ok: z.literal(false),
  reason: z.string(),
});

export const BathCheckComputationSchema = z.object({
  viscosity: z.union([
    z.object({
      ok: z.literal(true),
      method: z.enum(['cup', 'measured']),
      kinematicMm2S: z.number(),
      dynamicMPaS: z.number().optional(),
      source: z.string(),
      validSeconds: z
        .object({
          min: z.number(),
          max: z.number(),
        })
        .optional(),
    }),
    z.object({
      ok: z.literal(false),
      message: z.string(),
      validSeconds: z.object({
        min: z.number(),
        max: z.number(),
      }),
      suggestedCup: z
        .enum([
          'zahn-1',
          'zahn-2',
          'zahn-3',
          'zahn-4',
          'zahn-5',
          'shell-1',
          'shell-2',
          'shell-2.5',
          'shell-3',
          'shell-3.5',
          'shell-4',
          'shell-5',
          'shell-6',
          'ford-1',
          'ford-2',
          'ford-3',
          'ford-4',
          'ford-5',
          'iso-3mm',
          'iso-4mm',
          'iso-5mm',
          'iso-6mm',
          'din-4mm',
        ])
        .optional(),
    }),
  ]),
  band: z.enum(['high', 'low', 'in']).nullable(),
  addition: z.union([BathAdditionSchema, BathAdditionRefusalSchema]).nullable(),
  additionNote: z.string().optional(),
  bathMassKg: z.number().nullable(),
});

/** What `recordAddition` answers (`src/lib/server/services/baths.ts`). */
export const AdditionSchema = z.object({
  id: z.number(),
  tankAssetId: z.number(),
  tankCode: z.string(),
  at: z.string(),
  by: z.string(),
  kind: z.enum(['solvent', 'fresh-lacquer']),
  massKg: z.number(),
  lotId: z.number().nullable(),
  lotCode: z.string().nullable(),
  checkId: z.number().nullable(),
  recommendation: z.unknown(),
  note: z.string().nullable(),
});

/** What `recordFilterChange` answers (`src/lib/server/services/baths.ts`). */
export const FilterChangeRowSchema = z.object({
  id: z.number(),
  tankAssetId: z.number(),
  tankCode: z.string(),
  at: z.string(),
  by: z.string(),
  filterType: z.string(),
  ratingUm: z.number().nullable(),
  note: z.string().nullable(),
});

/** What `listBaths` (one element) answers (`src/lib/server/services/baths.ts`). */
export const BathStateSchema = z.object({
  tank: z.object({
    id: z.number(),
    code: z.string(),
    name: z.string(),
    role: z.string().nullable(),
    volumeL: z.number().nullable(),
    lineId: z.number().nullable(),
    lineName: z.string().nullable(),
  }),
  charge: ChargeSchema.nullable(),
  age: z
    .object({
      ageDays: z.number(),
      potLifeFractionUsed: z.number(),
      status: z.enum(['ok', 'near-end', 'expired']),
    })
    .nullable(),
  lotExpired: z.boolean(),
  window: ProcessWindowInForceSchema.nullable(),
  lastCheck: BathCheckSchema.nullable(),
  lastComputation: BathCheckComputationSchema.nullable(),
  recentChecks: z.array(BathCheckSchema),
  recentAdditions: z.array(AdditionSchema),
  lastFilterChange: FilterChangeRowSchema.nullable(),
  context: z.object({
    limits: ProcessWindowLimitsAnswerSchema.nullable(),
    targetSolidsPct: z.number().nullable(),
    lotSolidsPct: z.number().nullable(),
    estimatedBathMassKg: z.number().nullable(),
  }),
});

/** What `recordCheck` answers (`src/lib/server/services/baths.ts`). */
export const RecordedCheckSchema = z.object({
  check: BathCheckSchema,
  computation: BathCheckComputationSchema,
  window: ProcessWindowInForceSchema.nullable(),
});

export const LotListSchema = z.array(LotSchema);
export const BathListSchema = z.array(BathStateSchema);
export const BathCheckListSchema = z.array(BathCheckSchema);
export const AdditionListSchema = z.array(AdditionSchema);
export const FilterChangeListSchema = z.array(FilterChangeRowSchema);
export const ChargeListSchema = z.array(ChargeSchema);
