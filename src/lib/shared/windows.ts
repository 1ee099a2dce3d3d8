/**
 * Process windows (recipes) per lacquer × substrate: the limits the process is held to.
 * Every limit carries its unit in the field name. Shared by the server, the islands and
 * the ingest worker (pure: zod only).
 */
import { z } from 'zod';

export interface Range {
  min: number;
  max: number;
  target?: number;
}

export interface ProcessWindowLimits {
  withdrawalSpeedMmS?: Range;
  viscosityMm2S?: Range;
  bathTempC?: Range;
  roomRhPct?: { min: number; max: number };
  flashOffMin?: { min: number; max: number };
  cureSetpointC?: Range;
  minCureTempC: number;
  minEquivalentMinutes: number;
  referenceC: number;
  activationEnergyKJMol: number;
  maxPartTempC: number;
  maxRampCPerMin?: number;
  targetDryThicknessUm?: number;
  maxGapSeconds?: number;
}

export interface ProcessWindowInForce {
  id: number;
  version: number;
  name: string;
  lacquer: string;
  substrate: string;
  limits: ProcessWindowLimits;
  effectiveFrom: string;
}

const num = (what: string) => z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be finite.`);

/** A min–max range (optionally with a target inside it) within physical bounds. */
function rangeSchema(what: string, lo: number, hi: number, withTarget: boolean) {
  const bounded = (label: string) =>
    num(label).min(lo, `${label} must be at least ${lo}.`).max(hi, `${label} must be at most ${hi}.`);
  const shape = {
    min: bounded(`${what} low`),
    max: bounded(`${what} high`),
    ...(withTarget ? { target: bounded(`${what} target`).optional() } : {}),
  };
  return z
    .object(shape)
    .strict()
    .superRefine((r, ctx) => {
      const v = r as { min: number; max: number; target?: number };
      if (!(v.min < v.max))
        ctx.addIssue({ code: 'custom', path: ['max'], message: `${what}: the high limit must be above the low limit.` });
      if (v.target !== undefined && (v.target < v.min || v.target > v.max)) {
        ctx.addIssue({
          code: 'custom',
          path: ['target'],
          message: `${what}: the target must lie between the low and high limits.`,
        });
      }
    });
}

/** Field catalogue with units (forms, diffs and the API document use it). */
export const LIMIT_FIELDS = [
  { key: 'withdrawalSpeedMmS', label: 'Withdrawal speed', unit: 'mm/s', kind: 'range', target: true },
  { key: 'viscosityMm2S', label: 'Bath viscosity', unit: 'mm²/s', kind: 'range', target: true },
  { key: 'bathTempC', label: 'Bath temperature', unit: '°C', kind: 'range', target: true },
  { key: 'roomRhPct', label: 'Room relative humidity', unit: '%', kind: 'range', target: false },
  { key: 'flashOffMin', label: 'Flash-off time', unit: 'min', kind: 'range', target: false },
  { key: 'cureSetpointC', label: 'Cure setpoint', unit: '°C', kind: 'range', target: true },
  { key: 'minCureTempC', label: 'Minimum cure temperature', unit: '°C', kind: 'value', required: true },
  { key: 'minEquivalentMinutes', label: 'Minimum equivalent cure', unit: 'min at reference', kind: 'value', required: true },
  { key: 'referenceC', label: 'Reference temperature', unit: '°C', kind: 'value', required: true },
  { key: 'activationEnergyKJMol', label: 'Lacquer activation energy', unit: 'kJ/mol', kind: 'value', required: true },
  { key: 'maxPartTempC', label: 'Maximum part temperature (substrate)', unit: '°C', kind: 'value', required: true },
  { key: 'maxRampCPerMin', label: 'Maximum ramp rate', unit: '°C/min', kind: 'value', required: false },
  { key: 'targetDryThicknessUm', label: 'Target dry thickness', unit: 'µm', kind: 'value', required: false },
  { key: 'maxGapSeconds', label: 'Maximum data gap', unit: 's', kind: 'value', required: false },
] as const;

export type LimitFieldKey = (typeof LIMIT_FIELDS)[number]['key'];

export const ProcessWindowLimitsSchema = z
  .object({
    withdrawalSpeedMmS: rangeSchema('Withdrawal speed (mm/s)', 0, 100, true).optional(),
    viscosityMm2S: rangeSchema('Bath viscosity (mm²/s)', 0, 10_000, true).optional(),
    bathTempC: rangeSchema('Bath temperature (°C)', -20, 80, true).optional(),
    roomRhPct: rangeSchema('Room humidity (%)', 0, 100, false).optional(),
    flashOffMin: rangeSchema('Flash-off time (min)', 0, 24 * 60, false).optional(),
    cureSetpointC: rangeSchema('Cure setpoint (°C)', 0, 300, true).optional(),
    minCureTempC: num('Minimum cure temperature (°C)')
      .min(0, 'Minimum cure temperature must be at least 0 °C.')
      .max(300, 'Minimum cure temperature must be at most 300 °C.'),
    minEquivalentMinutes: num('Minimum equivalent minutes')
      .positive('Minimum equivalent minutes must be above 0.')
      .max(100_000, 'Minimum equivalent minutes must be at most 100 000.'),
    referenceC: num('Reference temperature (°C)')
      .min(0, 'Reference temperature must be at least 0 °C.')
      .max(300, 'Reference temperature must be at most 300 °C.'),
    activationEnergyKJMol: num('Activation energy (kJ/mol)')
      .positive('Activation energy must be above 0 kJ/mol.')
      .max(500, 'Activation energy must be at most 500 kJ/mol.'),
    maxPartTempC: num('Maximum part temperature (°C)')
      .min(0, 'Maximum part temperature must be at least 0 °C.')
      .max(300, 'Maximum part temperature must be at most 300 °C.'),
    maxRampCPerMin: num('Maximum ramp (°C/min)')
      .positive('Maximum ramp must be above 0 °C/min.')
      .max(100, 'Maximum ramp must be at most 100 °C/min.')
      .optional(),
    targetDryThicknessUm: num('Target dry thickness (µm)')
      .positive('Target dry thickness must be above 0 µm.')
      .max(100, 'Target dry thickness must be at most 100 µm.')
      .optional(),
    maxGapSeconds: num('Maximum gap (s)')
      .positive('Maximum gap must be above 0 s.')
      .max(86_400, 'Maximum gap must be at most 86 400 s.')
      .optional(),
  })
  .strict()
  .superRefine((l, ctx) => {
    if (l.minCureTempC >= l.maxPartTempC) {
      ctx.addIssue({
        code: 'custom',
        path: ['maxPartTempC'],
        message: 'The maximum part temperature must be above the minimum cure temperature.',
      });
    }
    if (l.cureSetpointC && l.cureSetpointC.max > l.maxPartTempC) {
      ctx.addIssue({
        code: 'custom',
        path: ['cureSetpointC', 'max'],
        message: 'The cure setpoint high limit must not exceed the maximum part temperature.',
      });
    }
    if (l.cureSetpointC && l.cureSetpointC.min < l.minCureTempC) {
      ctx.addIssue({
        code: 'custom',
        path: ['cureSetpointC', 'min'],
        message: 'The cure setpoint low limit must not be below the minimum cure temperature.',
      });
    }
  });

const nameText = z.string().trim().min(1, 'Enter a name.').max(120, 'At most 120 characters.');
const noteText = z.string().trim().max(2000, 'At most 2000 characters.');
const id = (what: string) =>
  z
    .number({ error: `Choose a ${what}.` })
    .int(`Choose a ${what}.`)
    .positive(`Choose a ${what}.`);

/** `POST /api/v1/windows` — a new draft version of a lacquer × substrate window. */
export const WindowDraftCreateSchema = z
  .object({
    lacquerId: id('lacquer'),
    materialId: id('substrate'),
    name: nameText,
    limits: ProcessWindowLimitsSchema,
    note: noteText.optional(),
  })
  .strict();
export type WindowDraftCreate = z.infer<typeof WindowDraftCreateSchema>;

/** `PATCH /api/v1/windows/{id}` — edit a draft (only drafts can be edited). */
export const WindowDraftUpdateSchema = z
  .object({ name: nameText.optional(), limits: ProcessWindowLimitsSchema.optional(), note: noteText.optional() })
  .strict()
  .refine((v) => v.name !== undefined || v.limits !== undefined || v.note !== undefined, {
    message: 'Nothing to change.',
    path: ['limits'],
  });
export type WindowDraftUpdate = z.infer<typeof WindowDraftUpdateSchema>;

/** An electronic signature: the signer's password again and the meaning of the signature. */
export function signatureSchema<M extends string>(meaning: M) {
  return z
    .object({
      password: z.string().min(1, 'Enter your password to sign.').max(500),
      meaning: z.literal(meaning, { error: `The meaning of this signature must be "${meaning}".` }),
    })
    .strict();
}

/** `POST /api/v1/windows/{id}/approve`. */
export const WindowApproveSchema = signatureSchema('approved');
export type WindowApprove = z.infer<typeof WindowApproveSchema>;

/** `POST /api/v1/windows/assignments` — which window a line/oven runs from a time on. */
export const WindowAssignSchema = z
  .object({
    assetId: id('line or oven'),
    windowId: id('window'),
    from: z.iso.datetime({ offset: true, error: 'Give the start as an ISO 8601 date-time with zone.' }).optional(),
    note: noteText.optional(),
  })
  .strict();
export type WindowAssign = z.infer<typeof WindowAssignSchema>;

export const WINDOW_STATUSES = ['draft', 'effective', 'superseded'] as const;
export type WindowStatus = (typeof WINDOW_STATUSES)[number];

/** One change between two versions' limits (for the version diff). */
export interface LimitChange {
  path: string;
  before: number | null;
  after: number | null;
}

/** Flatten limits to `path → number` (e.g. `viscosityMm2S.max`). */
export function flattenLimits(limits: Partial<ProcessWindowLimits> | null | undefined): Map<string, number> {
  const out = new Map<string, number>();
  for (const [k, v] of Object.entries(limits ?? {})) {
    if (typeof v === 'number') out.set(k, v);
    else if (v && typeof v === 'object') {
      for (const [k2, v2] of Object.entries(v as Record<string, unknown>)) if (typeof v2 === 'number') out.set(`${k}.${k2}`, v2);
    }
  }
  return out;
}

/** Differences between two versions' limits, in the catalogue's order. */
export function diffLimits(
  before: Partial<ProcessWindowLimits> | null | undefined,
  after: Partial<ProcessWindowLimits> | null | undefined,
): LimitChange[] {
  const a = flattenLimits(before);
  const b = flattenLimits(after);
  const keys = [...new Set([...a.keys(), ...b.keys()])];
  const order = (p: string) => {
    const [head, tail] = p.split('.');
    const i = LIMIT_FIELDS.findIndex((f) => f.key === head);
    return (i < 0 ? 99 : i) * 10 + (tail === 'min' ? 0 : tail === 'target' ? 1 : tail === 'max' ? 2 : 3);
  };
  return keys
    .sort((x, y) => order(x) - order(y))
    .filter((k) => a.get(k) !== b.get(k))
    .map((k) => ({ path: k, before: a.get(k) ?? null, after: b.get(k) ?? null }));
}

/** Where a value sits against a range: below / inside / above (null when no range). */
export function againstRange(
  value: number,
  range: { min: number; max: number } | undefined | null,
): 'low' | 'in' | 'high' | null {
  if (!range) return null;
  if (value < range.min) return 'low';
  if (value > range.max) return 'high';
  return 'in';
}
