/**
 * Answers of the calculators that have no output schema in `lib/shared/calc.ts`.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `withdrawalSpeedForThickness` answers (`src/lib/domain/film/dip-coat.ts`). */
export const SpeedAdviceSchema = z.object({
  speedMmS: z.number(),
  model: z.enum(['calibrated', 'landau-levich', 'gravity-viscous']),
  capillaryNumber: z.number().optional(),
  warnings: z.array(z.string()),
});

export const ThicknessFitSchema = z.object({
  constant: z.number(),
  exponent: z.number(),
  rSquared: z.number(),
  residualSdLog: z.number(),
  residualSdUm: z.number(),
  n: z.number(),
});

/** What `calibrateThicknessConstant` answers (`src/lib/domain/film/dip-coat.ts`). */
export const ThicknessCalibrationSchema = z.object({
  fixedExponent: ThicknessFitSchema,
  freeExponent: ThicknessFitSchema.nullable(),
});

/** What `BathAddition` answers (`src/lib/domain/film/bath-maintenance.ts`). */
export const BathAdditionResultSchema = z.object({
  ok: z.literal(true),
  kind: z.enum(['solvent', 'lacquer', 'none']),
  massKg: z.number(),
  resultingBathMassKg: z.number(),
  resultingSolidsPct: z.number(),
});

/** What `bayerRatio` answers (`src/lib/domain/quality/abrasion.ts`). */
export const AbrasionResultSchema = z.object({
  bayerRatio: z.number(),
  premium: z.boolean(),
});

export const ExtremumSchema = z.object({
  wavelengthNm: z.number(),
  reflectance: z.number(),
  kind: z.enum(['min', 'max']),
  prominence: z.number(),
});

/** What `findExtrema` answers (`src/lib/domain/quality/fringes.ts`). */
export const FringeAnalysisSchema = z.union([
  z.object({
    measurable: z.literal(true),
    thicknessNm: z.number(),
    sdNm: z.number(),
    count: z.number(),
    contrast: z.number(),
    maxima: z.array(ExtremumSchema),
    minima: z.array(ExtremumSchema),
  }),
  z.object({
    measurable: z.literal(false),
    reason: z.string(),
    contrast: z.number(),
    maxima: z.array(ExtremumSchema),
    minima: z.array(ExtremumSchema),
  }),
]);

/** What `viscosityFromCup` answers (`src/lib/domain/film/viscosity-cups.ts`). */
export const ViscosityCupResultSchema = z.object({
  inRange: z.boolean(),
  kinematicMm2S: z.number().optional(),
  dynamicMPaS: z.number().optional(),
  validSeconds: z.object({
    min: z.number(),
    max: z.number(),
  }),
  cup: z.enum([
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
  ]),
  source: z.string(),
  provenance: z.enum(['published', 'from memory']),
  message: z.string().optional(),
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
});

/** `POST /api/v1/calc/bath-addition`: the addition with the safety caution. */
export const BathAdditionAnswerSchema = BathAdditionResultSchema.extend({ caution: z.string() });
/** `POST /api/v1/calc/activation-energy`. */
export const ActivationEnergyAnswerSchema = z.object({ activationEnergyKJMol: z.number() });
/** `POST /api/v1/calc/fringe-thickness/spectrum`: a measurable analysis and how many spectrum points were read. */
export const FringeSpectrumAnswerSchema = FringeAnalysisSchema.options[0].extend({ points: z.int() });
