/**
 * Answers of the process-window endpoints: window versions, assignments, the window in force, materials, lacquers.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

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

export const SignatureRecordSchema = z.object({
  userId: z.number(),
  username: z.string(),
  displayName: z.string(),
  meaning: z.string(),
  signedAt: z.string(),
});

/** What `getWindow` answers (`src/lib/server/services/windows.ts`). */
export const WindowViewSchema = z.object({
  id: z.number(),
  lacquerId: z.number(),
  lacquer: z.string(),
  materialId: z.number(),
  substrate: z.string(),
  version: z.number(),
  name: z.string(),
  status: z.enum(['draft', 'effective', 'superseded']),
  limits: ProcessWindowLimitsAnswerSchema,
  note: z.string().nullable(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  approvedBy: z.string().nullable(),
  approvedSignature: SignatureRecordSchema.nullable(),
  effectiveFrom: z.string().nullable(),
  supersededAt: z.string().nullable(),
});

/** What `listAssignments` (one element) answers (`src/lib/core/window-store.ts`). */
export const AssignmentSchema = z.object({
  id: z.number(),
  assetId: z.number(),
  assetCode: z.string(),
  assetName: z.string(),
  windowId: z.number(),
  windowName: z.string(),
  windowVersion: z.number(),
  lacquer: z.string(),
  substrate: z.string(),
  validFrom: z.string(),
  validTo: z.string().nullable(),
  assignedBy: z.string().nullable(),
  note: z.string().nullable(),
});

/** What `windowWithVersions` answers (`src/lib/server/services/windows.ts`). */
export const WindowWithVersionsSchema = z.object({
  window: WindowViewSchema,
  versions: z.array(
    z.object({
      changes: z.array(
        z.object({
          path: z.string(),
          before: z.number().nullable(),
          after: z.number().nullable(),
        }),
      ),
      previousId: z.number().nullable(),
      id: z.number(),
      lacquerId: z.number(),
      lacquer: z.string(),
      materialId: z.number(),
      substrate: z.string(),
      version: z.number(),
      name: z.string(),
      status: z.enum(['draft', 'effective', 'superseded']),
      limits: ProcessWindowLimitsAnswerSchema,
      note: z.string().nullable(),
      createdBy: z.string().nullable(),
      createdAt: z.string(),
      updatedAt: z.string(),
      approvedBy: z.string().nullable(),
      approvedSignature: SignatureRecordSchema.nullable(),
      effectiveFrom: z.string().nullable(),
      supersededAt: z.string().nullable(),
    }),
  ),
  assignments: z.array(AssignmentSchema),
});

/** What `approveWindow` answers (`src/lib/server/services/windows.ts`). */
export const ApprovedWindowSchema = WindowViewSchema;

/** What `updateDraft` answers (`src/lib/server/services/windows.ts`). */
export const UpdatedDraftSchema = WindowViewSchema;

/** What `assignWindow` answers (`src/lib/server/services/windows.ts`). */
export const AssignedWindowSchema = AssignmentSchema;

/** What `windowInForce` answers (`src/lib/core/window-store.ts`). */
export const WindowInForceSchema = z.object({
  id: z.number(),
  version: z.number(),
  name: z.string(),
  lacquer: z.string(),
  substrate: z.string(),
  limits: ProcessWindowLimitsAnswerSchema,
  effectiveFrom: z.string(),
});

/** What `createMaterial` answers (`src/lib/server/services/windows.ts`). */
export const MaterialSchema = z.object({
  id: z.number(),
  code: z.string(),
  name: z.string(),
  refractiveIndex: z.number(),
  active: z.boolean(),
});

/** What `createLacquer` answers (`src/lib/server/services/windows.ts`). */
export const LacquerSchema = z.object({
  id: z.number(),
  name: z.string(),
  maker: z.string(),
  solidsPct: z.number(),
  densityGCm3: z.number(),
  activationEnergyKJMol: z.number(),
  note: z.string().nullable(),
});

export const WindowListSchema = z.array(WindowViewSchema);
export const AssignmentListSchema = z.array(AssignmentSchema);
export const MaterialListSchema = z.array(MaterialSchema);
export const LacquerListSchema = z.array(LacquerSchema);
