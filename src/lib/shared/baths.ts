/**
 * The bath log: schemas for lacquers, lacquer lots, bath charges, bath checks, additions and
 * filter changes, and the types of what a bath check computes (the computation itself is
 * lib/domain/film/bath-check.ts, used by the entry form and again by the server).
 */
import { z } from 'zod';
import { CUP_ID_VALUES, type CupId } from './calc.ts';
import type { ProcessWindowLimits } from './windows.ts';

/** The caution shown beside every addition (solvents and lacquer are flammable and harmful). */
export const BATH_CAUTION =
  'Solvents and lacquer are flammable and harmful. Add them following the material’s safety data sheet, with ventilation, and under local fire codes.';

const id = (what: string) =>
  z
    .number({ error: `Choose a ${what}.` })
    .int(`Choose a ${what}.`)
    .positive(`Choose a ${what}.`);
const text = (max: number) => z.string().trim().max(max, `At most ${max} characters.`);
const positive = (label: string, unit: string, max: number) =>
  z
    .number({ error: `${label} must be a number.` })
    .positive(`${label} must be greater than 0 ${unit}.`)
    .max(max, `${label} must be at most ${max} ${unit}.`);
const pct = (label: string) =>
  z
    .number({ error: `${label} must be a number.` })
    .gt(0, `${label} must be above 0 %.`)
    .lt(100, `${label} must be below 100 %.`);
const when = z.iso.datetime({ offset: true, error: 'Give the time as an ISO 8601 date-time with zone.' });
const day = z.iso.date({ error: 'Give the date as YYYY-MM-DD.' });

/** `POST /api/v1/lacquers`. Solids % is the lacquer's nominal (as-used) solids: the bath's solids target. */
export const LacquerCreateSchema = z
  .object({
    name: text(120).min(1, 'Enter a name.'),
    maker: text(120).min(1, 'Enter the maker.'),
    solidsPct: pct('Nominal solids'),
    densityGCm3: positive('Density', 'g/cm³', 5),
    activationEnergyKJMol: positive('Activation energy', 'kJ/mol', 500),
    note: text(2000).optional(),
  })
  .strict();
export type LacquerCreate = z.infer<typeof LacquerCreateSchema>;

/** `POST /api/v1/materials` (a substrate for the windows). */
export const MaterialCreateSchema = z
  .object({
    code: z
      .string()
      .trim()
      .regex(/^[a-z0-9][a-z0-9.-]{0,31}$/, 'Use lower-case letters, digits, dots and hyphens (at most 32).'),
    name: text(120).min(1, 'Enter a name.'),
    refractiveIndex: z
      .number({ error: 'Refractive index must be a number.' })
      .gt(1, 'Refractive index must be above 1.')
      .lt(3, 'Refractive index must be below 3.'),
  })
  .strict();
export type MaterialCreate = z.infer<typeof MaterialCreateSchema>;

/** `POST /api/v1/lots` — a received lot of lacquer. */
export const LotCreateSchema = z
  .object({
    lacquerId: id('lacquer'),
    lotCode: text(60).min(1, 'Enter the maker’s lot number.'),
    receivedOn: day,
    expiresOn: day,
    solidsPct: pct('Lot solids'),
    note: text(2000).optional(),
  })
  .strict()
  .refine((v) => v.expiresOn >= v.receivedOn, {
    message: 'The expiry date must not be before the received date.',
    path: ['expiresOn'],
  });
export type LotCreate = z.infer<typeof LotCreateSchema>;

/** `POST /api/v1/baths/charges` — a tank filled from a lot. */
export const ChargeCreateSchema = z
  .object({
    tankAssetId: id('tank'),
    lotId: id('lot'),
    chargedAt: when.optional(),
    massKg: positive('Charged mass', 'kg', 10_000),
    potLifeDays: positive('Pot life', 'days', 3650),
    note: text(2000).optional(),
  })
  .strict();
export type ChargeCreate = z.infer<typeof ChargeCreateSchema>;

/**
 * `POST /api/v1/baths/checks` — a bath check: either a cup reading (cup + efflux seconds) or a
 * measured kinematic viscosity (mm²/s), plus bath temperature and solids. `bathMassKg` is
 * optional (the server estimates it from the charge and the additions).
 */
export const BathCheckInputSchema = z
  .object({
    tankAssetId: id('tank'),
    cup: z.enum(CUP_ID_VALUES, { error: 'Choose a cup from the list.' }).optional(),
    effluxSeconds: positive('Efflux time', 's', 3600).optional(),
    measuredMm2S: positive('Measured viscosity', 'mm²/s', 100_000).optional(),
    bathTempC: z
      .number({ error: 'Bath temperature must be a number.' })
      .min(-20, 'Bath temperature must be at least −20 °C.')
      .max(80, 'Bath temperature must be at most 80 °C.')
      .optional(),
    solidsPct: pct('Solids').optional(),
    densityGCm3: positive('Density', 'g/cm³', 5).optional(),
    bathMassKg: positive('Bath mass', 'kg', 10_000).optional(),
    at: when.optional(),
    note: text(2000).optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const cupReading = v.cup !== undefined || v.effluxSeconds !== undefined;
    if (cupReading && v.measuredMm2S !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['measuredMm2S'],
        message: 'Give either a cup reading or a measured viscosity, not both.',
      });
    } else if (!cupReading && v.measuredMm2S === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['effluxSeconds'],
        message: 'Give a cup and its efflux seconds, or a measured viscosity.',
      });
    } else if (cupReading && v.cup === undefined) {
      ctx.addIssue({ code: 'custom', path: ['cup'], message: 'Choose the cup the efflux time was taken with.' });
    } else if (cupReading && v.effluxSeconds === undefined) {
      ctx.addIssue({ code: 'custom', path: ['effluxSeconds'], message: 'Enter the efflux time in seconds.' });
    }
  });
export type BathCheckInput = z.infer<typeof BathCheckInputSchema>;

export const ADDITION_KINDS = ['solvent', 'fresh-lacquer'] as const;
export type AdditionKind = (typeof ADDITION_KINDS)[number];

/** `POST /api/v1/baths/additions`. `checkId` links the check whose recommendation was followed. */
export const BathAdditionEntrySchema = z
  .object({
    tankAssetId: id('tank'),
    kind: z.enum(ADDITION_KINDS, { error: 'Choose solvent or fresh lacquer.' }),
    massKg: positive('Added mass', 'kg', 1000),
    lotId: id('lot').optional(),
    checkId: id('check').optional(),
    at: when.optional(),
    note: text(2000).optional(),
  })
  .strict();
export type BathAdditionEntry = z.infer<typeof BathAdditionEntrySchema>;

/** `POST /api/v1/baths/filter-changes`. */
export const FilterChangeSchema = z
  .object({
    tankAssetId: id('tank'),
    filterType: text(120).min(1, 'Enter the filter type.'),
    ratingUm: positive('Filter rating', 'µm', 1000).optional(),
    at: when.optional(),
    note: text(2000).optional(),
  })
  .strict();
export type FilterChange = z.infer<typeof FilterChangeSchema>;

/** `GET /api/v1/baths/...?tankId&limit` query. */
export const BathListQuerySchema = z.object({
  tankId: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(100),
});

/** A feasible addition. */
export interface BathAddition {
  ok: true;
  /** 'solvent' lowers solids, 'lacquer' raises them, 'none' when already on target. */
  kind: 'solvent' | 'lacquer' | 'none';
  /** Mass to add, kg. */
  massKg: number;
  /** Bath mass after the addition, kg. */
  resultingBathMassKg: number;
  /** Solids after the addition (equals the target), wt %. */
  resultingSolidsPct: number;
}

/** A refused request, with the reason in plain words. */
export interface BathAdditionRefusal {
  ok: false;
  reason: string;
}

/** Bath age and pot-life status. */
export interface BathAge {
  /** Age in days (86 400 000 ms per day). */
  ageDays: number;
  /** ageDays / potLifeDays. */
  potLifeFractionUsed: number;
  /** 'ok' below the near-end fraction, 'near-end' from it (≥), 'expired' from 1 (≥). */
  status: 'ok' | 'near-end' | 'expired';
}

/** The viscosity a check yields, or why it yields none. */
export type CheckViscosity =
  | {
      ok: true;
      method: 'cup' | 'measured';
      kinematicMm2S: number;
      dynamicMPaS?: number;
      source: string;
      validSeconds?: { min: number; max: number };
    }
  | { ok: false; message: string; validSeconds: { min: number; max: number }; suggestedCup?: CupId };

/** Context a check is computed in (from the tank's charge, lot and window). */
export interface BathCheckContext {
  /** Limits of the window in force (null when the tank runs none). */
  limits: ProcessWindowLimits | null;
  /** Bath solids target, wt % (the lacquer's nominal solids). */
  targetSolidsPct: number | null;
  /** Fresh lacquer's solids, wt % (the charged lot's). */
  lotSolidsPct: number | null;
  /** Working estimate of the bath mass, kg: the charged mass (a bath is kept topped up to its working level). */
  estimatedBathMassKg: number | null;
}

export interface BathCheckComputation {
  viscosity: CheckViscosity;
  /** Where the viscosity sits against the window's viscosity range. */
  band: 'low' | 'in' | 'high' | null;
  /** Solids against target: the addition by mass balance, a refusal, or null when solids were not given. */
  addition: (BathAddition | BathAdditionRefusal) | null;
  /** Why there is no addition when solids were given but context is missing. */
  additionNote?: string;
  bathMassKg: number | null;
}

/** Plain words for an addition result. */
export function describeAddition(a: BathAddition | BathAdditionRefusal | null): string {
  if (!a) return '';
  if (!a.ok) return `No addition: ${a.reason}.`;
  if (a.kind === 'none') return 'Solids are on target: no addition.';
  const what = a.kind === 'solvent' ? 'solvent' : 'fresh lacquer';
  const base = `Add ${a.massKg.toFixed(2)} kg of ${what} (bath then ${a.resultingBathMassKg.toFixed(1)} kg at ${a.resultingSolidsPct.toFixed(1)} % solids).`;
  // More than a quarter of the bath is not a top-up: the reading or the lot's solids deserve a second look.
  const before = a.resultingBathMassKg - a.massKg;
  return a.massKg > 0.25 * before
    ? `${base} That is more than a quarter of the bath — check the solids reading and the lot’s solids before adding.`
    : base;
}

// TEMPORARY: services/baths.ts (rewritten on another branch) still imports these from here; the
// integrator points it at lib/domain/film/bath-check.ts after merging and deletes this line.
export { computeBathCheck, recommendAddition } from '../domain/film/bath-check.ts';
