/**
 * Quality records: tests (cross-cut adhesion, boil then cross-cut, Bayer abrasion, coating
 * thickness, cosmetic inspection), the lab's acceptance settings, holds and nonconformances.
 * Zod schemas shared by the forms, the endpoints and the seeds.
 *
 * Sources: ISO 2409 and ASTM D3359 (cross-cut classes), ASTM F735 (Bayer abrasion ratio),
 * reflectance-fringe thickness (Macleod, *Thin-Film Optical Filters*). Acceptance defaults are
 * common practice of lens labs (cross-cut class 0 / 5B only, also after boiling) and are the
 * lab's to change.
 */
import { z } from 'zod';
import { JobNumberSchema, MAX_JOBS_PER_SCAN } from './jobs.ts';

export const TEST_KINDS = ['crosscut', 'boil', 'abrasion', 'thickness', 'cosmetic'] as const;
export type TestKind = (typeof TEST_KINDS)[number];
export const TEST_KIND_LABELS: Record<TestKind, string> = {
  crosscut: 'Cross-cut adhesion',
  boil: 'Boil + cross-cut',
  abrasion: 'Bayer abrasion',
  thickness: 'Coating thickness',
  cosmetic: 'Cosmetic inspection',
};
/** Kinds that are adhesion tests (the adhesion p chart counts these). */
export const ADHESION_KINDS: readonly TestKind[] = ['crosscut', 'boil'];

export const TEST_RESULTS = ['pass', 'fail'] as const;
export type TestResult = (typeof TEST_RESULTS)[number];

/** Cosmetic defect types inspected on a coated lens. */
export const DEFECT_TYPES = [
  'crazing',
  'cracks',
  'peeling',
  'runs-sags',
  'drips-edge-bead',
  'dust-inclusions',
  'pinholes',
  'orange-peel',
  'haze',
  'scratches',
  'other',
] as const;
export type DefectType = (typeof DEFECT_TYPES)[number];
export const DEFECT_LABELS: Record<DefectType, string> = {
  crazing: 'Crazing',
  cracks: 'Cracks',
  peeling: 'Peeling / delamination',
  'runs-sags': 'Runs or sags',
  'drips-edge-bead': 'Drips / edge bead',
  'dust-inclusions': 'Dust or inclusions',
  pinholes: 'Pinholes',
  'orange-peel': 'Orange peel',
  haze: 'Haze',
  scratches: 'Scratches',
  other: 'Other',
};

const num = (label: string) => z.number({ error: `${label} must be a number.` });
const isoTime = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO 8601 date-time with zone.` });
const note = z.string().trim().max(2000, { error: 'At most 2000 characters.' });

// ---------------------------------------------------------------------------------------------
// Acceptance settings (site_settings key 'acceptance')

export const AcceptanceSchema = z
  .object({
    /** Highest ISO 2409 class accepted on a dry cross-cut (0 = 5B only). */
    crosscutMaxIso: z.number().int().min(0).max(5),
    /** Highest ISO 2409 class accepted after boiling. */
    boilMaxIso: z.number().int().min(0).max(5),
    /** Lowest Bayer ratio accepted (ASTM F735; 1 = as good as uncoated CR-39). */
    minBayerRatio: num('The lowest Bayer ratio').min(0).max(50),
    /** Accepted cured thickness range, µm. */
    thicknessUm: z
      .object({ min: num('The thinnest accepted coat').min(0).max(100), max: num('The thickest accepted coat').min(0).max(100) })
      .refine((v) => v.min < v.max, { error: 'The thickest accepted coat must be above the thinnest.', path: ['max'] }),
    /** Most defects accepted per type on a lens (0 = none). */
    cosmeticMaxPerType: z.record(z.enum(DEFECT_TYPES), z.number().int().min(0).max(1000)),
  })
  .strict();
export type Acceptance = z.infer<typeof AcceptanceSchema>;

/**
 * Defaults: cross-cut and boil class 0 / 5B only (common practice of lens labs); Bayer ratio
 * ≥ 1, i.e. no worse than uncoated CR-39 (ASTM F735 meaning of the ratio; the threshold is
 * common practice); cured thickness 1.5–4 µm (typical thermal dip hard coat, several lens-optics
 * texts); no cosmetic defect of any type (common practice). The lab sets its own.
 */
export const DEFAULT_ACCEPTANCE: Acceptance = {
  crosscutMaxIso: 0,
  boilMaxIso: 0,
  minBayerRatio: 1,
  thicknessUm: { min: 1.5, max: 4 },
  cosmeticMaxPerType: Object.fromEntries(DEFECT_TYPES.map((t) => [t, 0])) as Record<DefectType, number>,
};

// ---------------------------------------------------------------------------------------------
// Tests

/** Largest spectrum CSV accepted inline, characters (2 MB). */
export const MAX_SPECTRUM_CSV_CHARS = 2_000_000;

const base = {
  jobNumber: JobNumberSchema,
  testedAt: isoTime('The test time').optional(),
  note: note.optional(),
};

const percentRemoved = num('Percent removed')
  .min(0, { error: 'Percent removed must be at least 0 %.' })
  .max(100, { error: 'Percent removed must be at most 100 %.' });

/** `POST /api/v1/quality/tests` body (one of the test kinds). */
export const TestCreateSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('crosscut'), ...base, percentRemoved }).strict(),
    z
      .object({
        kind: z.literal('boil'),
        ...base,
        percentRemoved,
        boilCycles: z
          .number({ error: 'Boil cycles must be a whole number.' })
          .int({ error: 'Boil cycles must be a whole number.' })
          .min(1, { error: 'A boil test needs at least 1 cycle.' })
          .max(20, { error: 'At most 20 boil cycles.' }),
      })
      .strict(),
    z
      .object({
        kind: z.literal('abrasion'),
        ...base,
        referenceHazeGainPct: num('The reference haze gain')
          .gt(0, { error: 'The reference haze gain must be above 0 %.' })
          .max(100),
        testHazeGainPct: num('The test-lens haze gain').gt(0, { error: 'The test-lens haze gain must be above 0 %.' }).max(100),
      })
      .strict(),
    z
      .object({
        kind: z.literal('thickness'),
        ...base,
        method: z.enum(['measured', 'spectrum']),
        thicknessUm: num('Thickness').gt(0, { error: 'Thickness must be above 0 µm.' }).max(100).optional(),
        spectrumCsv: z.string().min(1).max(MAX_SPECTRUM_CSV_CHARS, { error: 'The spectrum is larger than 2 MB.' }).optional(),
        refractiveIndex: num('Refractive index')
          .min(1.2, { error: 'Refractive index must be at least 1.2.' })
          .max(2.5)
          .optional(),
      })
      .strict()
      .superRefine((v, ctx) => {
        if (v.method === 'measured' && v.thicknessUm === undefined) {
          ctx.addIssue({ code: 'custom', path: ['thicknessUm'], message: 'Give the measured thickness in µm.' });
        }
        if (v.method === 'spectrum') {
          if (!v.spectrumCsv)
            ctx.addIssue({
              code: 'custom',
              path: ['spectrumCsv'],
              message: 'Attach the reflectance spectrum (CSV: wavelength_nm, reflectance).',
            });
          if (v.refractiveIndex === undefined)
            ctx.addIssue({ code: 'custom', path: ['refractiveIndex'], message: 'Give the coat’s refractive index.' });
        }
      }),
    z
      .object({
        kind: z.literal('cosmetic'),
        ...base,
        defects: z
          .array(z.object({ type: z.enum(DEFECT_TYPES), count: z.number().int().min(0).max(1000) }).strict())
          .max(DEFECT_TYPES.length),
      })
      .strict(),
  ],
  { error: `kind must be one of ${TEST_KINDS.join(', ')}` },
);
export type TestCreate = z.infer<typeof TestCreateSchema>;

/** `GET /api/v1/quality/tests` query. */
export const TestListQuerySchema = z.object({
  result: z.enum(TEST_RESULTS).optional(),
  kind: z.enum(TEST_KINDS).optional(),
  job: z.string().trim().max(40).optional(),
  from: isoTime('from').optional(),
  to: isoTime('to').optional(),
  format: z.enum(['json', 'csv']).default('json'),
  limit: z.coerce.number().int().min(1).max(5000).default(500),
});
export type TestListQuery = z.infer<typeof TestListQuerySchema>;

/** One test as the list endpoint returns it (id, jobNumber, kind, result, …). */
export interface TestListItem {
  id: number;
  jobNumber: string;
  kind: TestKind;
  result: TestResult;
  testedAt: string;
  testedBy: string;
  summary: string;
  computed: Record<string, unknown>;
  boilCycles: number | null;
  reasons: string[];
  files: number;
  loadId: number | null;
  ovenCode: string | null;
  jobStatus: string;
}

// ---------------------------------------------------------------------------------------------
// Holds and nonconformances

export const DISPOSITIONS = ['release', 'recoat', 'scrap', 'use-as-is'] as const;
export type Disposition = (typeof DISPOSITIONS)[number];
export const DISPOSITION_LABELS: Record<Disposition, string> = {
  release: 'Release (no defect found)',
  recoat: 'Strip and re-coat',
  scrap: 'Scrap',
  'use-as-is': 'Use as is (deviation)',
};
/** What each disposition does to the job. */
export const DISPOSITION_JOB_STATUS: Record<Disposition, 'released' | 'recoat' | 'scrapped'> = {
  release: 'released',
  recoat: 'recoat',
  scrap: 'scrapped',
  'use-as-is': 'released',
};

/** Meanings of a hold-closing signature (21 CFR 11.50(a)(3): review, approval, responsibility). */
export const HOLD_SIGN_MEANINGS = ['approved', 'reviewed'] as const;

const signature = {
  password: z.string().min(1, { error: 'Enter your password to sign.' }).max(500),
  meaning: z.enum(HOLD_SIGN_MEANINGS, { error: `The meaning must be one of ${HOLD_SIGN_MEANINGS.join(', ')}.` }),
};

const reason = z
  .string({ error: 'Give the reason for the hold.' })
  .trim()
  .min(3, { error: 'Give the reason for the hold (at least 3 characters).' })
  .max(1000, { error: 'At most 1000 characters.' });

/** `POST /api/v1/holds`: hold jobs (quality). */
export const HoldPlaceSchema = z
  .object({
    jobNumbers: z
      .array(JobNumberSchema)
      .min(1, { error: 'Select at least one job.' })
      .max(MAX_JOBS_PER_SCAN, { error: `At most ${MAX_JOBS_PER_SCAN} jobs at once.` }),
    reason,
    ncId: z.number().int().positive().optional(),
  })
  .strict();
export type HoldPlace = z.infer<typeof HoldPlaceSchema>;

/** `POST /api/v1/holds/close`: release or disposition holds (signed). */
export const HoldCloseSchema = z
  .object({
    holdIds: z.array(z.number().int().positive()).min(1, { error: 'Select at least one hold.' }).max(MAX_JOBS_PER_SCAN),
    disposition: z.enum(DISPOSITIONS, { error: `The disposition must be one of ${DISPOSITIONS.join(', ')}.` }),
    comment: z.string().trim().max(2000).default(''),
    ...signature,
  })
  .strict()
  .refine((v) => v.disposition === 'release' || v.comment.length >= 3, {
    error: 'Say why (at least 3 characters): a disposition other than release needs a comment.',
    path: ['comment'],
  });
export type HoldClose = z.infer<typeof HoldCloseSchema>;

/** `GET /api/v1/holds` query. */
export const HoldListQuerySchema = z.object({
  status: z.enum(['active', 'closed', 'all']).default('active'),
  job: z.string().trim().max(40).optional(),
  format: z.enum(['json', 'csv']).default('json'),
});

export const SUSPECTED_CAUSES = ['load', 'bath', 'load-and-bath', 'other', 'unknown'] as const;
export const SUSPECTED_CAUSE_LABELS: Record<(typeof SUSPECTED_CAUSES)[number], string> = {
  load: 'Cure (oven load)',
  bath: 'Bath (charge / state at dip)',
  'load-and-bath': 'Cure and bath',
  other: 'Other',
  unknown: 'Not yet known',
};

/** `POST /api/v1/nonconformances`. */
export const NcCreateSchema = z
  .object({
    title: z.string().trim().min(3, { error: 'Give a short title (at least 3 characters).' }).max(200),
    description: z.string().trim().max(5000).default(''),
    suspectedCause: z.enum(SUSPECTED_CAUSES).default('unknown'),
    suspectedLoadId: z.number().int().positive().optional(),
    suspectedBathChargeId: z.number().int().positive().optional(),
    testIds: z
      .array(z.number().int().positive())
      .min(1, { error: 'Tie the nonconformance to at least one failed test.' })
      .max(200),
    /** Active holds to tie to this nonconformance. */
    holdIds: z.array(z.number().int().positive()).max(MAX_JOBS_PER_SCAN).default([]),
  })
  .strict();
export type NcCreate = z.infer<typeof NcCreateSchema>;

/** `POST /api/v1/nonconformances/{id}/dispositions`: disposition held jobs of the NC (signed). */
export const NcDispositionSchema = z
  .object({
    holdIds: z.array(z.number().int().positive()).min(1, { error: 'Select at least one held job.' }).max(MAX_JOBS_PER_SCAN),
    disposition: z.enum(DISPOSITIONS),
    comment: z.string().trim().min(3, { error: 'Say why (at least 3 characters).' }).max(2000),
    ...signature,
  })
  .strict();
export type NcDisposition = z.infer<typeof NcDispositionSchema>;

/** `POST /api/v1/nonconformances/{id}/close` (signed). */
export const NcCloseSchema = z.object({ comment: z.string().trim().max(2000).default(''), ...signature }).strict();

// ---------------------------------------------------------------------------------------------
// Trace settings (site_settings key 'trace')

export const TraceSettingsSchema = z
  .object({
    /** Jobs dipped from the same bath charge within ± this many hours are siblings. */
    bathSiblingHours: z.number().min(0.5).max(168),
  })
  .strict();
export type TraceSettings = z.infer<typeof TraceSettingsSchema>;
/** Default ±8 h (one shift either side; common practice). */
export const DEFAULT_TRACE_SETTINGS: TraceSettings = { bathSiblingHours: 8 };

export const TraceQuerySchema = z.object({
  hours: z.coerce.number().min(0.5).max(168).optional(),
});
