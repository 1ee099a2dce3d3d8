/**
 * Measurement-system analysis: the zod schemas of the gauge and study records and of the MSA
 * calculators (one schema for the form, the endpoint and the stored record), and the CSV reader
 * of a study's readings.
 */
import { z } from 'zod';

const num = (label: string) => z.number({ error: `${label} must be a finite number` });
const positive = (label: string) => num(label).positive({ error: `${label} must be above zero` });

export const GAUGE_KINDS = ['thickness', 'haze', 'viscosity-cup', 'other'] as const;
export const GAUGE_KIND_LABELS: Record<(typeof GAUGE_KINDS)[number], string> = {
  thickness: 'Thickness gauge',
  haze: 'Haze meter',
  'viscosity-cup': 'Viscosity cup',
  other: 'Other gauge',
};

export const GaugeCreateSchema = z.object({
  name: z.string().trim().min(1, { error: 'name must not be empty' }).max(80),
  kind: z.enum(GAUGE_KINDS),
  unit: z.string().trim().min(1, { error: 'unit must not be empty' }).max(20),
  resolution: positive('resolution').nullable().optional(),
  note: z.string().trim().max(500).nullable().optional(),
});
export type GaugeCreate = z.infer<typeof GaugeCreateSchema>;

const MAX_READINGS = 5000;

export const GaugeReadingSchema = z.object({
  appraiser: z.string().trim().min(1, { error: 'appraiser must not be empty' }).max(40),
  part: z.number().int().positive({ error: 'part must be a positive whole number' }).max(1000),
  trial: z.number().int().positive({ error: 'trial must be a positive whole number' }).max(50),
  value: num('value'),
});

export const GaugeRrInputSchema = z.object({
  method: z.enum(['anova', 'average-range']).default('anova'),
  tolerance: positive('tolerance').optional(),
  readings: z
    .array(GaugeReadingSchema)
    .min(8, { error: 'a gauge study needs at least 2 appraisers × 2 parts × 2 trials' })
    .max(MAX_READINGS),
});
export type GaugeRrInput = z.infer<typeof GaugeRrInputSchema>;

export const GaugeBiasInputSchema = z.object({
  reference: num('reference'),
  readings: z
    .array(num('reading'))
    .min(2, { error: 'at least 2 readings (the AIAG manual asks for 10 or more)' })
    .max(MAX_READINGS),
  processVariation: positive('processVariation').optional(),
});
export type GaugeBiasInput = z.infer<typeof GaugeBiasInputSchema>;

export const GaugeLinearityInputSchema = z.object({
  points: z
    .array(z.object({ reference: num('reference'), reading: num('reading') }))
    .min(3, { error: 'at least 3 readings' })
    .max(MAX_READINGS),
  processVariation: positive('processVariation').optional(),
});
export type GaugeLinearityInput = z.infer<typeof GaugeLinearityInputSchema>;

const studyCommon = {
  gaugeId: z.number().int().positive(),
  title: z.string().trim().min(1, { error: 'title must not be empty' }).max(120),
  studiedAt: z.iso.datetime({ offset: true }).optional(),
};

export const GaugeStudyCreateSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('grr'), ...studyCommon, ...GaugeRrInputSchema.shape }),
  z.object({ kind: z.literal('bias'), ...studyCommon, ...GaugeBiasInputSchema.shape }),
  z.object({ kind: z.literal('linearity'), ...studyCommon, ...GaugeLinearityInputSchema.shape }),
]);
export type GaugeStudyCreate = z.infer<typeof GaugeStudyCreateSchema>;

export const CharacteristicGaugeSchema = z.object({ gaugeId: z.number().int().positive().nullable() });

/** A line-numbered problem in a study CSV. */
export class StudyCsvError extends Error {
  constructor(public readonly errors: { line: number; message: string }[]) {
    super(errors.map((e) => `line ${e.line}: ${e.message}`).join('; '));
    this.name = 'StudyCsvError';
  }
}

function splitLine(line: string): string[] {
  return line.split(/[,;\t]/).map((c) => c.trim().replace(/^"(.*)"$/, '$1'));
}

/**
 * Read a crossed study from CSV with a header `appraiser,part,trial,value` (comma, semicolon or
 * tab; any column order). Blank lines are skipped; every bad line is reported with its number.
 */
export function parseGaugeRrCsv(text: string): z.infer<typeof GaugeReadingSchema>[] {
  const lines = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  const headerAt = lines.findIndex((l) => l.trim() !== '');
  if (headerAt < 0) throw new StudyCsvError([{ line: 1, message: 'the file is empty' }]);
  const header = splitLine(lines[headerAt]!).map((h) => h.toLowerCase());
  const col = (name: string) => header.indexOf(name);
  const missing = ['appraiser', 'part', 'trial', 'value'].filter((n) => col(n) < 0);
  if (missing.length)
    throw new StudyCsvError([{ line: headerAt + 1, message: `the header needs the columns ${missing.join(', ')}` }]);
  const out: z.infer<typeof GaugeReadingSchema>[] = [];
  const errors: { line: number; message: string }[] = [];
  for (let i = headerAt + 1; i < lines.length; i += 1) {
    const raw = lines[i]!;
    if (raw.trim() === '') continue;
    const cells = splitLine(raw);
    const row = {
      appraiser: cells[col('appraiser')] ?? '',
      part: Number(cells[col('part')]),
      trial: Number(cells[col('trial')]),
      value: Number((cells[col('value')] ?? '').replace(',', '.')),
    };
    const parsed = GaugeReadingSchema.safeParse(row);
    if (!parsed.success || !Number.isFinite(row.value)) {
      errors.push({ line: i + 1, message: parsed.success ? 'value must be a number' : parsed.error.issues[0]!.message });
      if (errors.length >= 20) break;
    } else out.push(parsed.data);
  }
  if (errors.length) throw new StudyCsvError(errors);
  if (out.length > MAX_READINGS) throw new StudyCsvError([{ line: lines.length, message: `at most ${MAX_READINGS} readings` }]);
  return out;
}
