/**
 * Oven temperature-uniformity surveys: the survey CSV (a time column, then one column per
 * survey thermocouple in °C), the stabilised-soak rule, and the settings (class table and the
 * survey interval). Shared by the upload form, the endpoints and the seeds. Pure.
 *
 * Uniformity = hottest and coldest corrected reading minus setpoint over the stabilised soak;
 * class from a configurable table (SAE AMS2750 furnace classes as the published template).
 */
import { z } from 'zod';
import { normaliseHeader, parseCsv, CsvSyntaxError } from './csv-table.ts';

/** Result of a uniformity survey (computed by lib/domain/oven/uniformity.ts). */
export interface UniformityResult {
  /** Hottest corrected reading − setpoint, °C. */
  hottestDeviationC: number;
  /** Coldest corrected reading − setpoint, °C. */
  coldestDeviationC: number;
  hottestSensor: string;
  coldestSensor: string;
  /** Tightest class whose ±tolerance holds both deviations; null when none does. */
  uniformityClass: number | null;
  /** That class's tolerance, °C (null with the class). */
  classToleranceC: number | null;
  /** 'outside every class' when uniformityClass is null. */
  message?: string;
}

/** Stabilised soak, automatic rule: every sensor within setpoint − 2 °C, then 10 more minutes (common practice). */
export const AUTO_STABILISE_BAND_C = 2;
export const AUTO_STABILISE_WAIT_MIN = 10;

/** Default survey interval: 90 days (common practice for a cure oven; the lab sets its own). */
export const DEFAULT_SURVEY_INTERVAL_DAYS = 90;

const isoTime = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO 8601 date-time with zone.` });

/** Largest survey CSV accepted, characters (5 MB, like every upload). */
export const MAX_SURVEY_CSV_CHARS = 5 * 1024 * 1024;

export const ClassRowSchema = z
  .object({
    class: z.number().int().min(1).max(99),
    toleranceC: z.number().gt(0).max(200),
  })
  .strict();

/** `PUT /api/v1/surveys/settings` (site_settings key 'ovenSurveys'). */
export const SurveySettingsSchema = z
  .object({
    intervalDays: z.number().int().min(1, { error: 'At least 1 day.' }).max(730, { error: 'At most 730 days.' }),
    classTableName: z.string().trim().min(1).max(100),
    classTable: z
      .array(ClassRowSchema)
      .min(1, { error: 'The class table needs at least one class.' })
      .max(20)
      .superRefine((rows, ctx) => {
        const seen = new Set<number>();
        rows.forEach((r, i) => {
          if (seen.has(r.class))
            ctx.addIssue({ code: 'custom', path: [i, 'class'], message: `Class ${r.class} is listed twice.` });
          seen.add(r.class);
        });
      }),
  })
  .strict();
export type SurveySettings = z.infer<typeof SurveySettingsSchema>;

/** `POST /api/v1/surveys/preview` and `POST /api/v1/surveys`. */
export const SurveyInputSchema = z
  .object({
    ovenAssetId: z.number().int().positive({ error: 'Choose the oven.' }),
    setpointC: z
      .number({ error: 'Give the setpoint in °C.' })
      .min(20, { error: 'The setpoint must be at least 20 °C.' })
      .max(400),
    csv: z
      .string({ error: 'Attach the survey CSV.' })
      .min(1, { error: 'The survey CSV is empty.' })
      .max(MAX_SURVEY_CSV_CHARS, { error: 'The survey CSV is larger than 5 MB.' }),
    fileName: z.string().trim().max(200).default('survey.csv'),
    /** Start of the stabilised soak; omitted = automatic rule. For elapsed-time files, minutes from the start. */
    stabilisedFromMinutes: z.number().min(0).max(100_000).optional(),
    /** Survey date when the CSV carries elapsed time only. */
    surveyedAt: isoTime('The survey date').optional(),
    /** Calibration corrections per sensor name, °C (added to every reading). */
    corrections: z.record(z.string(), z.number().min(-50).max(50)).default({}),
    note: z.string().trim().max(2000).optional(),
  })
  .strict();
export type SurveyInput = z.infer<typeof SurveyInputSchema>;

/** A parsed survey file. */
export interface SurveyTable {
  /** Minutes from the first row. */
  minutes: number[];
  /** Epoch ms of the first row when the file has absolute times, else null. */
  startMs: number | null;
  sensors: { name: string; readingsC: number[] }[];
}

/** A survey file's problems, with 1-based line numbers. */
export class SurveyCsvError extends Error {
  constructor(public errors: { line: number; message: string }[]) {
    super(errors.map((e) => `line ${e.line}: ${e.message}`).join('; '));
  }
}

const TIME_COLUMNS = {
  iso: ['time', 'timestamp', 'date_time', 'datetime'],
  s: ['elapsed_s', 'seconds', 'elapsed_seconds', 't_s'],
  min: ['elapsed_min', 'minutes', 'elapsed_minutes', 't_min'],
};

/**
 * Parses a survey CSV: first column `time` (ISO 8601 with zone), `elapsed_s` or `elapsed_min`;
 * every other column one thermocouple (°C). Times must increase. Every cell must be a number
 * (a decimal comma is not accepted: use a point). At least 2 rows and 1 sensor.
 * @throws SurveyCsvError listing every bad line (up to 50), CsvSyntaxError on broken structure.
 */
export function parseSurveyCsv(text: string): SurveyTable {
  const records = parseCsv(text);
  const header = records[0];
  if (!header) throw new SurveyCsvError([{ line: 1, message: 'the file is empty' }]);
  const first = normaliseHeader(header.cells[0] ?? '');
  const timeKind = TIME_COLUMNS.iso.includes(first)
    ? 'iso'
    : TIME_COLUMNS.s.includes(first)
      ? 's'
      : TIME_COLUMNS.min.includes(first)
        ? 'min'
        : null;
  const errors: { line: number; message: string }[] = [];
  if (!timeKind)
    errors.push({ line: header.line, message: 'the first column must be time (ISO 8601), elapsed_s or elapsed_min' });
  const names = header.cells.slice(1).map((n) => n.trim());
  if (names.length === 0) errors.push({ line: header.line, message: 'no sensor columns after the time column' });
  names.forEach((n, i) => {
    if (!n) errors.push({ line: header.line, message: `sensor column ${i + 2} has no name` });
    else if (names.indexOf(n) !== i) errors.push({ line: header.line, message: `sensor "${n}" is named twice` });
  });
  if (errors.length) throw new SurveyCsvError(errors);
  const rows = records.slice(1);
  if (rows.length < 2) throw new SurveyCsvError([{ line: header.line, message: 'a survey needs at least 2 rows of readings' }]);
  const times: number[] = [];
  const sensors = names.map((name) => ({ name, readingsC: [] as number[] }));
  for (const r of rows) {
    const rowErrors: string[] = [];
    if (r.cells.length !== header.cells.length)
      rowErrors.push(`has ${r.cells.length} fields; the header has ${header.cells.length}`);
    const tCell = r.cells[0] ?? '';
    let t = NaN;
    if (timeKind === 'iso') {
      t = /(Z|[+-]\d{2}:?\d{2})$/i.test(tCell) ? Date.parse(tCell) : NaN;
      if (!Number.isFinite(t)) rowErrors.push(`time "${tCell}" is not an ISO 8601 date-time with zone`);
    } else {
      const x = /^-?\d+(\.\d+)?$/.test(tCell) ? Number(tCell) : NaN;
      if (!Number.isFinite(x)) rowErrors.push(`elapsed time "${tCell}" is not a number`);
      t = timeKind === 's' ? x * 1000 : x * 60_000;
    }
    const prev = times[times.length - 1];
    if (Number.isFinite(t) && prev !== undefined && t <= prev) rowErrors.push('time does not increase');
    const values = names.map((_, i) => {
      const c = r.cells[i + 1] ?? '';
      const v = /^[-+]?\d+(\.\d+)?([eE][-+]?\d+)?$/.test(c) ? Number(c) : NaN;
      if (!Number.isFinite(v) || v < -273.15 || v > 2000) rowErrors.push(`${names[i]}: "${c}" is not a temperature in °C`);
      return v;
    });
    if (rowErrors.length) {
      errors.push({ line: r.line, message: rowErrors.join('; ') });
      if (errors.length >= 50) break;
      continue;
    }
    times.push(t);
    values.forEach((v, i) => (sensors[i] as { readingsC: number[] }).readingsC.push(v));
  }
  if (errors.length) throw new SurveyCsvError(errors);
  const t0 = times[0] as number;
  return { minutes: times.map((t) => (t - t0) / 60_000), startMs: timeKind === 'iso' ? t0 : null, sensors };
}

/**
 * Index of the first row of the stabilised soak by the automatic rule: the first row where every
 * sensor (with its correction) reads ≥ setpoint − 2 °C, plus 10 minutes; null when never reached
 * or no row remains after the wait.
 */
export function autoStabilisedIndex(
  table: SurveyTable,
  setpointC: number,
  corrections: Record<string, number> = {},
): number | null {
  const n = table.minutes.length;
  let reached: number | null = null;
  for (let i = 0; i < n; i++) {
    if (
      table.sensors.every((s) => (s.readingsC[i] as number) + (corrections[s.name] ?? 0) >= setpointC - AUTO_STABILISE_BAND_C)
    ) {
      reached = i;
      break;
    }
  }
  if (reached === null) return null;
  const from = (table.minutes[reached] as number) + AUTO_STABILISE_WAIT_MIN;
  const idx = table.minutes.findIndex((m) => m >= from - 1e-9);
  return idx < 0 ? null : idx;
}

/** Index of the first row at or after `minutes` from the start, or null. */
export function indexAtMinutes(table: SurveyTable, minutes: number): number | null {
  const idx = table.minutes.findIndex((m) => m >= minutes - 1e-9);
  return idx < 0 ? null : idx;
}

export { CsvSyntaxError };
