/**
 * Jobs, dip runs and oven loads: the zod schemas shared by the forms (islands), the endpoints
 * and the seeds, and the pure parsing of scanned and uploaded job lists.
 *
 * A job number is the lab's own reference for one order (usually a pair of lenses), as printed
 * on the job ticket's barcode: letters, digits and . _ / - (at most 40 characters).
 */
import { z } from 'zod';
import { normaliseHeader, parseCsv, CsvSyntaxError } from './csv-table.ts';

/** Job number pattern (the barcode on the job ticket). */
export const JOB_NUMBER_RE = /^[A-Za-z0-9][A-Za-z0-9._/-]{0,39}$/;

export const JobNumberSchema = z
  .string({ error: 'Give a job number.' })
  .trim()
  .regex(JOB_NUMBER_RE, { error: 'A job number is 1–40 letters, digits or . _ / - and starts with a letter or digit.' });

/** Rack or tray code (barcode on the rack). */
export const RackCodeSchema = z
  .string()
  .trim()
  .regex(JOB_NUMBER_RE, { error: 'A rack code is 1–40 letters, digits or . _ / - and starts with a letter or digit.' });

export const JOB_STATUSES = ['active', 'held', 'released', 'recoat', 'scrapped'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];
export const JOB_STATUS_LABELS: Record<JobStatus, string> = {
  active: 'Active',
  held: 'On hold',
  released: 'Released from hold',
  recoat: 'Strip and re-coat',
  scrapped: 'Scrapped',
};

const id = (what: string) =>
  z
    .number({ error: `Give the ${what}.` })
    .int()
    .positive({ error: `Give the ${what}.` });
const isoTime = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO 8601 date-time with zone.` });
const note = z.string().trim().max(1000, { error: 'At most 1000 characters.' });

/** Most jobs in one dip run or one scan. */
export const MAX_JOBS_PER_SCAN = 500;

/** A scanned/typed job list: each line (or comma/semicolon/tab-separated value) is one job number. */
export interface ParsedJobList {
  jobNumbers: string[];
  /** Entries that are not job numbers, with their 1-based line. */
  invalid: { line: number; value: string }[];
  /** Entries given twice (kept once). */
  duplicates: string[];
}

/**
 * Parses the text of a scanner (one barcode per line, the scanner's Enter as the newline) or a
 * typed list (commas, semicolons, tabs or spaces between numbers). Upper-cases nothing: job
 * numbers are kept as written. Duplicates are kept once.
 */
export function parseJobList(text: string): ParsedJobList {
  const jobNumbers: string[] = [];
  const invalid: ParsedJobList['invalid'] = [];
  const duplicates: string[] = [];
  const seen = new Set<string>();
  text.split(/\r\n|\r|\n/).forEach((raw, i) => {
    for (const value of raw.split(/[,;\t ]+/)) {
      const v = value.trim();
      if (!v) continue;
      if (!JOB_NUMBER_RE.test(v)) invalid.push({ line: i + 1, value: v });
      else if (seen.has(v)) duplicates.push(v);
      else {
        seen.add(v);
        jobNumbers.push(v);
      }
    }
  });
  return { jobNumbers, invalid, duplicates };
}

const jobNumberList = z
  .array(JobNumberSchema)
  .min(1, { error: 'Scan or type at least one job number.' })
  .max(MAX_JOBS_PER_SCAN, { error: `At most ${MAX_JOBS_PER_SCAN} jobs at once.` });

/** `POST /api/v1/dip-runs`: a rack dipped on a line, with the jobs it carried. */
export const DipRunCreateSchema = z
  .object({
    lineAssetId: id('dip line'),
    dippedAt: isoTime('The dip time').optional(),
    rackCode: RackCodeSchema.optional(),
    jobNumbers: jobNumberList,
    note: note.optional(),
  })
  .strict();
export type DipRunCreate = z.infer<typeof DipRunCreateSchema>;

/** `GET /api/v1/dip-runs` query. */
export const DipRunListQuerySchema = z.object({
  line: z.string().trim().max(40).optional(),
  job: z.string().trim().max(40).optional(),
  from: isoTime('from').optional(),
  to: isoTime('to').optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(200),
});

// ---------------------------------------------------------------------------------------------
// Job CSV import (two steps: preview, then commit of the good rows only)

/** Largest job CSV accepted, characters (1 MB). */
export const MAX_JOB_CSV_CHARS = 1_000_000;
/** Most rows in one job CSV. */
export const MAX_JOB_CSV_ROWS = 5000;

/** Recognised columns of a job CSV (header names; case, spaces and dashes do not matter). */
export const JOB_CSV_COLUMNS = {
  jobNumber: ['job_number', 'job', 'job_no', 'jobnumber'],
  customerRef: ['customer_ref', 'customer', 'customer_reference', 'order_ref'],
  lensMaterial: ['lens_material', 'material', 'substrate'],
  rackCode: ['rack', 'rack_code', 'tray', 'tray_code'],
} as const;

export interface JobCsvRow {
  line: number;
  jobNumber: string;
  customerRef: string | null;
  lensMaterial: string | null;
  rackCode: string | null;
}

export interface JobCsvPreview {
  good: JobCsvRow[];
  bad: { line: number; errors: string[] }[];
  /** Column names found, mapped to what they mean. */
  columns: Record<string, string>;
}

/**
 * Validates a job CSV: a header naming a job-number column (other columns optional), then one
 * job per row. Every bad row is reported with its line number and reasons; a job number given
 * twice is bad on its second line.
 * @throws CsvSyntaxError when the file's structure is broken (e.g. an unclosed quote), or the
 *   header has no job-number column.
 */
export function validateJobCsv(text: string): JobCsvPreview {
  const records = parseCsv(text);
  const header = records[0];
  if (!header) throw new CsvSyntaxError(1, 'the file is empty');
  const names = header.cells.map(normaliseHeader);
  const col = (aliases: readonly string[]) => names.findIndex((n) => aliases.includes(n));
  const idx = {
    jobNumber: col(JOB_CSV_COLUMNS.jobNumber),
    customerRef: col(JOB_CSV_COLUMNS.customerRef),
    lensMaterial: col(JOB_CSV_COLUMNS.lensMaterial),
    rackCode: col(JOB_CSV_COLUMNS.rackCode),
  };
  if (idx.jobNumber < 0) throw new CsvSyntaxError(header.line, 'the header must name a job_number column');
  if (records.length - 1 > MAX_JOB_CSV_ROWS) throw new CsvSyntaxError(header.line, `at most ${MAX_JOB_CSV_ROWS} rows per file`);
  const columns: Record<string, string> = {};
  for (const [k, i] of Object.entries(idx)) if (i >= 0) columns[header.cells[i] as string] = k;
  const good: JobCsvRow[] = [];
  const bad: JobCsvPreview['bad'] = [];
  const seen = new Map<string, number>();
  for (const r of records.slice(1)) {
    const errors: string[] = [];
    if (r.cells.length !== header.cells.length) {
      errors.push(`has ${r.cells.length} fields; the header has ${header.cells.length}`);
    }
    const cell = (i: number): string | null => (i >= 0 ? (r.cells[i] ?? '').trim() || null : null);
    const jobNumber = cell(idx.jobNumber) ?? '';
    if (!jobNumber) errors.push('job number is empty');
    else if (!JOB_NUMBER_RE.test(jobNumber)) errors.push(`"${jobNumber}" is not a job number (1–40 letters, digits or . _ / -)`);
    else if (seen.has(jobNumber)) errors.push(`job ${jobNumber} is already on line ${seen.get(jobNumber)}`);
    const customerRef = cell(idx.customerRef);
    if (customerRef && customerRef.length > 80) errors.push('customer reference is longer than 80 characters');
    const lensMaterial = cell(idx.lensMaterial);
    if (lensMaterial && lensMaterial.length > 80) errors.push('lens material is longer than 80 characters');
    const rackCode = cell(idx.rackCode);
    if (rackCode && !JOB_NUMBER_RE.test(rackCode)) errors.push(`"${rackCode}" is not a rack code`);
    if (errors.length) bad.push({ line: r.line, errors });
    else {
      seen.set(jobNumber, r.line);
      good.push({ line: r.line, jobNumber, customerRef, lensMaterial, rackCode });
    }
  }
  return { good, bad, columns };
}

const csvText = z
  .string({ error: 'Give the CSV text.' })
  .min(1, { error: 'The CSV is empty.' })
  .max(MAX_JOB_CSV_CHARS, { error: 'The CSV is larger than 1 MB.' });

/** `POST /api/v1/jobs/import/preview`. */
export const JobImportPreviewSchema = z.object({ csv: csvText }).strict();

/** `POST /api/v1/jobs/import/commit`: the same CSV and the fingerprint the preview returned. */
export const JobImportCommitSchema = z
  .object({
    csv: csvText,
    sha256: z.string().regex(/^[0-9a-f]{64}$/, { error: 'Give the sha256 the preview returned.' }),
    /** Attach the imported jobs to this dip run. */
    dipRunId: id('dip run').optional(),
  })
  .strict();

// ---------------------------------------------------------------------------------------------
// Oven loads

export const LOAD_STATUSES = ['open', 'closed'] as const;
export const CURE_VERDICTS = ['complete', 'under-cured', 'over-temperature', 'unverifiable'] as const;
export type CureVerdictName = (typeof CURE_VERDICTS)[number];
export const VERDICT_LABELS: Record<CureVerdictName, string> = {
  complete: 'Complete',
  'under-cured': 'Under-cured',
  'over-temperature': 'Over-temperature',
  unverifiable: 'Unverifiable',
};

/** `POST /api/v1/loads`: open a load by hand. */
export const LoadOpenSchema = z
  .object({
    ovenAssetId: id('oven'),
    openedAt: isoTime('The opening time').optional(),
    note: note.optional(),
  })
  .strict();
export type LoadOpen = z.infer<typeof LoadOpenSchema>;

/** `POST /api/v1/loads/{id}/close`. */
export const LoadCloseSchema = z
  .object({
    closedAt: isoTime('The closing time').optional(),
    note: note.optional(),
  })
  .strict();
export type LoadClose = z.infer<typeof LoadCloseSchema>;

/** `POST /api/v1/loads/{id}/jobs`: scan jobs and/or racks into an open load. */
export const LoadAddJobsSchema = z
  .object({
    jobNumbers: z.array(JobNumberSchema).max(MAX_JOBS_PER_SCAN).default([]),
    rackCodes: z.array(RackCodeSchema).max(100).default([]),
  })
  .strict()
  .refine((v) => v.jobNumbers.length + v.rackCodes.length > 0, { error: 'Scan at least one job or rack.', path: ['jobNumbers'] });
export type LoadAddJobs = z.infer<typeof LoadAddJobsSchema>;

/** `GET /api/v1/loads` query (also the list page's filters). */
export const LoadListQuerySchema = z.object({
  oven: z.string().trim().max(40).optional(),
  status: z.enum(LOAD_STATUSES).optional(),
  verdict: z.enum(CURE_VERDICTS).optional(),
  from: isoTime('from').optional(),
  to: isoTime('to').optional(),
  job: z.string().trim().max(40).optional(),
  format: z.enum(['json', 'csv']).default('json'),
  limit: z.coerce.number().int().min(1).max(2000).default(300),
});
export type LoadListQuery = z.infer<typeof LoadListQuerySchema>;

/** The cure record stored with a closed load (JSON in `oven_loads.record`). Units in the names. */
export interface StoredCureRecord {
  /** The window the load was judged against (null: none in force at the load's start). */
  window: {
    id: number;
    version: number;
    name: string;
    lacquer: string;
    substrate: string;
    minTempC: number;
    minEquivalentMinutes: number;
    referenceC: number;
    activationEnergyKJMol: number;
    maxPartTempC: number;
    maxRampCPerMin: number;
    maxGapSeconds: number;
    /** Which of the limits above are Coatrail's defaults because the window leaves them out. */
    defaulted: string[];
  } | null;
  /** Channels and readings the record was computed from. */
  source: {
    zoneChannels: { id: number; name: string }[];
    doorChannelId: number | null;
    readings: number;
    instants: number;
    badQualityExcluded: number;
  };
  openedAtMs: number;
  closedAtMs: number;
  durationMinutes: number;
  /** Minutes the coldest thermocouple was at or above the window's minimum (null without a window). */
  minutesAtOrAboveMin: number | null;
  peakC: number | null;
  peakAtMs: number | null;
  maxHeatUpCPerMin: number | null;
  maxCoolDownCPerMin: number | null;
  rampExceeded: boolean;
  /** Arrhenius equivalent minutes at the window's reference temperature (null without a window). */
  equivalentMinutes: number | null;
  gaps: { startMs: number; endMs: number; durationS: number }[];
  soak: { startMs: number; endMs: number } | null;
  door: {
    openings: number;
    openSeconds: number;
    openingsDuringSoak: number;
    events: { openedMs: number; closedMs: number; durationS: number; stillOpen: boolean }[];
  };
  verdict: CureVerdictName;
  reasons: string[];
  computedAtMs: number;
}
