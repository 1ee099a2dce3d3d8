/**
 * Answers of the oven-survey endpoints: computed and stored uniformity surveys and each oven's survey status.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

export const UniformityResultSchema = z.object({
  hottestDeviationC: z.number(),
  coldestDeviationC: z.number(),
  hottestSensor: z.string(),
  coldestSensor: z.string(),
  uniformityClass: z.number().nullable(),
  classToleranceC: z.number().nullable(),
  message: z.string().optional(),
});

/** What `computeSurvey` answers (`src/lib/server/services/surveys.ts`). */
export const SurveyComputationSchema = z.object({
  result: UniformityResultSchema,
  setpointC: z.number(),
  surveyedAtMs: z.number(),
  stabilisedFromMinutes: z.number(),
  stabilisedAuto: z.boolean(),
  rows: z.number(),
  durationMinutes: z.number(),
  sensors: z.array(
    z.object({
      name: z.string(),
      correctionC: z.number(),
      minC: z.number(),
      maxC: z.number(),
      meanC: z.number(),
    }),
  ),
  classTableName: z.string(),
  classTable: z.array(
    z.object({
      class: z.number(),
      toleranceC: z.number(),
    }),
  ),
  series: z.array(
    z.object({
      name: z.string(),
      points: z.array(
        z.object({
          x: z.number(),
          y: z.number(),
        }),
      ),
    }),
  ),
});

/** What `recordSurvey` answers (`src/lib/server/services/surveys.ts`). */
export const RecordedSurveySchema = z.object({
  id: z.number(),
  result: UniformityResultSchema,
  setpointC: z.number(),
  surveyedAtMs: z.number(),
  stabilisedFromMinutes: z.number(),
  stabilisedAuto: z.boolean(),
  rows: z.number(),
  durationMinutes: z.number(),
  sensors: z.array(
    z.object({
      name: z.string(),
      correctionC: z.number(),
      minC: z.number(),
      maxC: z.number(),
      meanC: z.number(),
    }),
  ),
  classTableName: z.string(),
  classTable: z.array(
    z.object({
      class: z.number(),
      toleranceC: z.number(),
    }),
  ),
  series: z.array(
    z.object({
      name: z.string(),
      points: z.array(
        z.object({
          x: z.number(),
          y: z.number(),
        }),
      ),
    }),
  ),
});

/** What `listSurveys` (one element) answers (`src/lib/server/services/surveys.ts`). */
export const SurveyItemSchema = z.object({
  id: z.number(),
  ovenAssetId: z.number(),
  ovenCode: z.string(),
  ovenName: z.string(),
  surveyedAt: z.string(),
  setpointC: z.number(),
  hottestDeviationC: z.number(),
  coldestDeviationC: z.number(),
  hottestSensor: z.string().nullable(),
  coldestSensor: z.string().nullable(),
  uniformityClass: z.number().nullable(),
  classToleranceC: z.number().nullable(),
  classTableName: z.string(),
  stabilisedAuto: z.boolean(),
  stabilisedFrom: z.string().nullable(),
  sensors: z.array(
    z.object({
      name: z.string(),
      correctionC: z.number(),
      minC: z.number(),
      maxC: z.number(),
      meanC: z.number(),
    }),
  ),
  note: z.string().nullable(),
  recordedBy: z.string().nullable(),
  fileId: z.number().nullable(),
});

/** What `surveyStatus` answers (`src/lib/server/services/surveys.ts`). */
export const SurveyStatusSchema = z.object({
  intervalDays: z.number(),
  ovens: z.array(
    z.object({
      ovenAssetId: z.number(),
      ovenCode: z.string(),
      ovenName: z.string(),
      last: SurveyItemSchema.nullable(),
      dueAt: z.string().nullable(),
      overdue: z.boolean(),
      daysSince: z.number().nullable(),
    }),
  ),
});

/** `GET /api/v1/surveys`: the surveys and each oven's survey status. */
export const SurveyListSchema = z.object({ surveys: z.array(SurveyItemSchema), status: SurveyStatusSchema });
