/**
 * Zod schemas (and inferred types) for the calculator endpoints
 * (`/api/v1/calc/*`), shared by the browser forms, the endpoints and the OpenAPI document.
 * The domain functions that answer them live in `lib/domain/{film,cure,quality,oven}`.
 *
 * Bounds are sanity limits for a lens lab, wide enough for any real reading; physics decides
 * which numbers must be positive. Zod v4 `z.number()` already refuses NaN and ±Infinity.
 */
import { z } from 'zod';

const num = (label: string) => z.number({ error: `${label} must be a finite number` });
const positive = (label: string, unit: string, max: number) =>
  num(label)
    .positive({ error: `${label} must be greater than 0 ${unit}` })
    .max(max, { error: `${label} must be at most ${max} ${unit}` });
const fraction = (label: string) =>
  num(label)
    .gt(0, { error: `${label} must be greater than 0` })
    .max(1, { error: `${label} must be at most 1` });
const percent = (label: string) =>
  num(label)
    .min(0, { error: `${label} must be at least 0 %` })
    .max(100, { error: `${label} must be at most 100 %` });
const celsius = (label: string) =>
  num(label)
    .gt(-273.15, { error: `${label} must be above absolute zero (−273.15 °C)` })
    .max(2000, { error: `${label} must be at most 2000 °C` });

// ---------------------------------------------------------------------------------------------
// Dip thickness

/** `POST /api/v1/calc/dip-thickness` body: η mPa·s, U mm/s, γ mN/m, ρ kg/m³, φ 0–1. */
export const DipThicknessInputSchema = z.object({
  viscosityMPaS: positive('viscosityMPaS', 'mPa·s', 100_000),
  speedMmS: positive('speedMmS', 'mm/s', 1000),
  surfaceTensionMNm: positive('surfaceTensionMNm', 'mN/m', 1000),
  densityKgM3: positive('densityKgM3', 'kg/m³', 30_000),
  solidsVolumeFraction: fraction('solidsVolumeFraction').optional(),
});
/** Parsed dip-thickness body. */
export type DipThicknessInput = z.infer<typeof DipThicknessInputSchema>;

/** Dip-thickness answer: µm, dimensionless Ca, mm, regime. */
export const DipThicknessOutputSchema = z.object({
  wetThicknessUm: z.number(),
  dryThicknessUm: z.number().optional(),
  capillaryNumber: z.number(),
  capillaryLengthMm: z.number(),
  regime: z.enum(['landau-levich', 'gravity-viscous']),
  warnings: z.array(z.string()).optional(),
});
/** Dip-thickness answer. */
export type DipThicknessOutput = z.infer<typeof DipThicknessOutputSchema>;

/** Withdrawal-speed advisor body: exactly one of the dry or wet target (µm). */
export const SpeedAdvisorInputSchema = z
  .object({
    viscosityMPaS: positive('viscosityMPaS', 'mPa·s', 100_000),
    targetDryThicknessUm: positive('targetDryThicknessUm', 'µm', 10_000).optional(),
    targetWetThicknessUm: positive('targetWetThicknessUm', 'µm', 10_000).optional(),
    solidsVolumeFraction: fraction('solidsVolumeFraction').optional(),
    surfaceTensionMNm: positive('surfaceTensionMNm', 'mN/m', 1000).optional(),
    densityKgM3: positive('densityKgM3', 'kg/m³', 30_000).optional(),
    thicknessConstant: positive('thicknessConstant', 'µm/(mPa·s·mm/s)^(2/3)', 1e6).optional(),
  })
  .refine((v) => (v.targetDryThicknessUm === undefined) !== (v.targetWetThicknessUm === undefined), {
    error: 'give exactly one of targetDryThicknessUm or targetWetThicknessUm',
    path: ['targetDryThicknessUm'],
  })
  .refine((v) => v.thicknessConstant !== undefined || (v.surfaceTensionMNm !== undefined && v.densityKgM3 !== undefined), {
    error: 'surfaceTensionMNm and densityKgM3 are needed without a calibrated thicknessConstant',
    path: ['thicknessConstant'],
  })
  .refine(
    (v) => v.thicknessConstant !== undefined || v.targetDryThicknessUm === undefined || v.solidsVolumeFraction !== undefined,
    { error: 'solidsVolumeFraction is needed for a dry target without a calibrated constant', path: ['solidsVolumeFraction'] },
  );
/** Parsed speed-advisor body. */
export type SpeedAdvisorInput = z.infer<typeof SpeedAdvisorInputSchema>;

/** Thickness-constant calibration body: at least 2 measured (speed, viscosity, thickness). */
export const CalibrationInputSchema = z.object({
  points: z
    .array(
      z.object({
        speedMmS: positive('speedMmS', 'mm/s', 1000),
        viscosityMPaS: positive('viscosityMPaS', 'mPa·s', 100_000),
        thicknessUm: positive('thicknessUm', 'µm', 10_000),
      }),
    )
    .min(2, { error: 'calibration needs at least 2 measurements' })
    .max(10_000, { error: 'at most 10 000 measurements' }),
});
/** Parsed calibration body. */
export type CalibrationInput = z.infer<typeof CalibrationInputSchema>;

// ---------------------------------------------------------------------------------------------
// Viscosity cups

/** The supported viscosity-cup ids (lib/domain/film/viscosity-cups holds each cup's equation). */
// prettier-ignore
export const CUP_ID_VALUES = [
  'zahn-1', 'zahn-2', 'zahn-3', 'zahn-4', 'zahn-5',
  'shell-1', 'shell-2', 'shell-2.5', 'shell-3', 'shell-3.5', 'shell-4', 'shell-5', 'shell-6',
  'ford-1', 'ford-2', 'ford-3', 'ford-4', 'ford-5',
  'iso-3mm', 'iso-4mm', 'iso-5mm', 'iso-6mm',
  'din-4mm',
] as const;

/** One of the supported cup ids. */
export type CupId = (typeof CUP_ID_VALUES)[number];

/** `POST /api/v1/calc/viscosity-cup` body: cup id, efflux seconds, density g/cm³. */
export const ViscosityCupInputSchema = z.object({
  cup: z.enum(CUP_ID_VALUES, { error: `cup must be one of ${CUP_ID_VALUES.join(', ')}` }),
  seconds: positive('seconds', 's', 3600),
  densityGCm3: positive('densityGCm3', 'g/cm³', 30).optional(),
  /** The lab's own cup constants (calibration certificate): ν = k(t − c) or ν = A·t − B/t. */
  equation: z
    .discriminatedUnion('kind', [
      z.object({ kind: z.literal('linear'), k: positive('equation.k', 'mm²/s²', 1e4), c: num('equation.c').min(-1e4).max(1e4) }),
      z.object({ kind: z.literal('a-b/t'), a: positive('equation.a', 'mm²/s²', 1e4), b: num('equation.b').min(-1e6).max(1e6) }),
    ])
    .optional(),
});
/** Parsed viscosity-cup body. */
export type ViscosityCupInput = z.infer<typeof ViscosityCupInputSchema>;

/** Viscosity-cup answer (mm²/s, mPa·s); no viscosity when out of range. */
export const ViscosityCupOutputSchema = z.object({
  inRange: z.boolean(),
  kinematicMm2S: z.number().optional(),
  dynamicMPaS: z.number().optional(),
  validSeconds: z.object({ min: z.number(), max: z.number() }),
  cup: z.enum(CUP_ID_VALUES),
  source: z.string(),
  message: z.string().optional(),
});
/** Viscosity-cup answer. */
export type ViscosityCupOutput = z.infer<typeof ViscosityCupOutputSchema>;

// ---------------------------------------------------------------------------------------------
// Bath maintenance

/** Bath-addition body: kg and wt %. */
export const BathAdditionInputSchema = z.object({
  bathMassKg: positive('bathMassKg', 'kg', 100_000),
  solidsNowPct: percent('solidsNowPct'),
  solidsTargetPct: percent('solidsTargetPct'),
  lacquerSolidsPct: percent('lacquerSolidsPct').optional(),
  maxBathMassKg: positive('maxBathMassKg', 'kg', 100_000).optional(),
});
/** Parsed bath-addition body. */
export type BathAdditionInput = z.infer<typeof BathAdditionInputSchema>;

// ---------------------------------------------------------------------------------------------
// Cure

const ProfilePointSchema = z.object({
  minutes: num('minutes')
    .min(0, { error: 'minutes must be at least 0' })
    .max(100_000, { error: 'minutes must be at most 100 000' }),
  tempC: celsius('tempC'),
});

/** `POST /api/v1/calc/cure-equivalent` body: profile (≥ 2 points, minutes non-decreasing), kJ/mol, °C. */
export const CureEquivalentInputSchema = z
  .object({
    profile: z
      .array(ProfilePointSchema)
      .min(2, { error: 'a profile needs at least 2 points' })
      .max(100_000, { error: 'at most 100 000 profile points' }),
    activationEnergyKJMol: positive('activationEnergyKJMol', 'kJ/mol', 500),
    referenceC: celsius('referenceC'),
    thresholdC: celsius('thresholdC').optional(),
  })
  .superRefine((v, ctx) => {
    for (let i = 1; i < v.profile.length; i++) {
      const prev = v.profile[i - 1];
      const cur = v.profile[i];
      if (prev && cur && cur.minutes < prev.minutes) {
        ctx.addIssue({
          code: 'custom',
          message: 'profile minutes must not decrease',
          path: ['profile', i, 'minutes'],
        });
        return;
      }
    }
  });
/** Parsed cure-equivalent body. */
export type CureEquivalentInput = z.infer<typeof CureEquivalentInputSchema>;

/** Cure-equivalent answer: minutes. */
export const CureEquivalentOutputSchema = z.object({
  equivalentMinutes: z.number(),
  minutesAtOrAbove: z.number().optional(),
});
/** Cure-equivalent answer. */
export type CureEquivalentOutput = z.infer<typeof CureEquivalentOutputSchema>;

/** Most readings the cure-verdict calculator takes: 100 000 (about 28 h at 1 s, 69 days at 1 min). */
export const CURE_VERDICT_MAX_READINGS = 100_000;

/** The cure window of `POST /api/v1/calc/cure-verdict` (°C, minutes, kJ/mol, °C/min, s). */
export const CureVerdictWindowSchema = z
  .object({
    minTempC: celsius('window.minTempC'),
    minEquivalentMinutes: num('window.minEquivalentMinutes')
      .min(0, { error: 'window.minEquivalentMinutes must be at least 0 min' })
      .max(100_000, { error: 'window.minEquivalentMinutes must be at most 100 000 min' }),
    referenceC: celsius('window.referenceC'),
    activationEnergyKJMol: positive('window.activationEnergyKJMol', 'kJ/mol', 500),
    maxPartTempC: celsius('window.maxPartTempC'),
    maxRampCPerMin: positive('window.maxRampCPerMin', '°C/min', 1000),
    maxGapSeconds: positive('window.maxGapSeconds', 's', 86_400),
    minSoakMinutes: num('window.minSoakMinutes')
      .min(0, { error: 'window.minSoakMinutes must be at least 0 min' })
      .max(100_000, { error: 'window.minSoakMinutes must be at most 100 000 min' })
      .optional(),
  })
  .refine((w) => w.maxPartTempC > w.minTempC, {
    error: 'window.maxPartTempC must be above window.minTempC',
    path: ['maxPartTempC'],
  });

/**
 * `POST /api/v1/calc/cure-verdict` body: readings (elapsed minutes non-decreasing, °C; 2 to
 * 100 000 of them) and the cure window. Checked in one pass (linear).
 */
export const CureVerdictInputSchema = z
  .object({
    readings: z
      .array(ProfilePointSchema)
      .min(2, { error: 'a profile needs at least 2 readings' })
      .max(CURE_VERDICT_MAX_READINGS, { error: `at most ${CURE_VERDICT_MAX_READINGS} readings` }),
    window: CureVerdictWindowSchema,
  })
  .superRefine((v, ctx) => {
    for (let i = 1; i < v.readings.length; i++) {
      const prev = v.readings[i - 1];
      const cur = v.readings[i];
      if (prev && cur && cur.minutes < prev.minutes) {
        ctx.addIssue({ code: 'custom', message: 'reading minutes must not decrease', path: ['readings', i, 'minutes'] });
        return;
      }
    }
  });
/** Parsed cure-verdict body. */
export type CureVerdictInput = z.infer<typeof CureVerdictInputSchema>;

/** Cure-verdict answer (the oven-load record's verdict). */
export const CureVerdictOutputSchema = z.object({
  verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']),
  reasons: z.array(z.string()),
  equivalentMinutes: z.number(),
  minutesAtOrAbove: z.number(),
  peakC: z.number().nullable(),
});
/** Cure-verdict answer. */
export type CureVerdictOutput = z.infer<typeof CureVerdictOutputSchema>;

const IsothermalScheduleSchema = z.object({
  minutes: positive('minutes', 'min', 100_000),
  tempC: celsius('tempC'),
});

/** Activation-energy body: two isothermal schedules (minutes, °C) believed equivalent. */
export const ActivationEnergyInputSchema = z
  .object({ scheduleA: IsothermalScheduleSchema, scheduleB: IsothermalScheduleSchema })
  .refine((v) => v.scheduleA.tempC !== v.scheduleB.tempC, {
    error: 'the two schedules need different temperatures',
    path: ['scheduleB', 'tempC'],
  });
/** Parsed activation-energy body. */
export type ActivationEnergyInput = z.infer<typeof ActivationEnergyInputSchema>;

// ---------------------------------------------------------------------------------------------
// Quality

/** `POST /api/v1/calc/fringe-thickness` body: nm, index, fringe count; lambda1 > lambda2. */
export const FringeThicknessInputSchema = z
  .object({
    lambda1Nm: positive('lambda1Nm', 'nm', 100_000),
    lambda2Nm: positive('lambda2Nm', 'nm', 100_000),
    refractiveIndex: num('refractiveIndex')
      .min(1, { error: 'refractiveIndex must be at least 1' })
      .max(5, { error: 'refractiveIndex must be at most 5' }),
    fringes: num('fringes')
      .int({ error: 'fringes must be a whole number' })
      .min(1, { error: 'fringes must be at least 1' })
      .max(1000, { error: 'fringes must be at most 1000' })
      .optional(),
  })
  .refine((v) => v.lambda1Nm > v.lambda2Nm, {
    error: 'lambda1Nm must be greater than lambda2Nm',
    path: ['lambda2Nm'],
  });
/** Parsed fringe-thickness body. */
export type FringeThicknessInput = z.infer<typeof FringeThicknessInputSchema>;

/** Fringe-thickness answer, nm. */
export const FringeThicknessOutputSchema = z.object({ thicknessNm: z.number() });
/** Fringe-thickness answer. */
export type FringeThicknessOutput = z.infer<typeof FringeThicknessOutputSchema>;

/** `POST /api/v1/calc/crosscut` body: percent of lattice area removed, 0–100. */
export const CrosscutInputSchema = z.object({ percentRemoved: percent('percentRemoved') });
/** Parsed cross-cut body. */
export type CrosscutInput = z.infer<typeof CrosscutInputSchema>;

/** Cross-cut answer: ISO 2409 class 0–5 and ASTM D3359 5B–0B. */
export const CrosscutOutputSchema = z.object({
  iso2409: z.number().int().min(0).max(5),
  astmD3359: z.enum(['5B', '4B', '3B', '2B', '1B', '0B']),
});
/** Cross-cut answer. */
export type CrosscutOutput = z.infer<typeof CrosscutOutputSchema>;

/** Abrasion body: haze gains (%) of the uncoated CR-39 reference and the test lens (> 0). */
export const AbrasionInputSchema = z.object({
  referenceHazeGainPct: positive('referenceHazeGainPct', '%', 100),
  testHazeGainPct: positive('testHazeGainPct', '%', 100),
});
/** Parsed abrasion body. */
export type AbrasionInput = z.infer<typeof AbrasionInputSchema>;

// ---------------------------------------------------------------------------------------------
// Oven survey

/** `POST /api/v1/calc/uniformity` body: setpoint °C and ≥ 1 sensor with ≥ 1 reading (°C). */
export const UniformityInputSchema = z
  .object({
    setpointC: celsius('setpointC'),
    sensors: z
      .array(
        z.object({
          name: z.string().trim().min(1, { error: 'sensor name must not be empty' }).max(100),
          readingsC: z
            .array(celsius('readingC'))
            .min(1, { error: 'a sensor needs at least one reading' })
            .max(100_000, { error: 'at most 100 000 readings per sensor' }),
          correctionC: num('correctionC').min(-50).max(50).optional(),
        }),
      )
      .min(1, { error: 'a survey needs at least one sensor' })
      .max(1000, { error: 'at most 1000 sensors' }),
    stabilisedFromIndex: num('stabilisedFromIndex').int().min(0).optional(),
  })
  .refine(
    (v) => v.stabilisedFromIndex === undefined || v.sensors.every((s) => s.readingsC.length > (v.stabilisedFromIndex ?? 0)),
    { error: 'every sensor needs readings after stabilisedFromIndex', path: ['stabilisedFromIndex'] },
  );
/** Parsed uniformity body. */
export type UniformityInput = z.infer<typeof UniformityInputSchema>;

/** Uniformity answer: °C deviations and the class (null when outside every class). */
export const UniformityOutputSchema = z.object({
  hottestDeviationC: z.number(),
  coldestDeviationC: z.number(),
  uniformityClass: z.number().int().nullable(),
});
/** Uniformity answer. */
export type UniformityOutput = z.infer<typeof UniformityOutputSchema>;
