/**
 * The SPC evaluation contract (product brief §6, `POST /api/v1/spc/evaluate`): the zod v4 input
 * schema with field-path validation, and the output types. Shared by the endpoint, the browser
 * and the ingest worker; the maths lives in `lib/domain/spc`.
 *
 * Sources for the vocabulary: NIST/SEMATECH e-Handbook of Statistical Methods ch. 6.3 (control
 * charts) and 6.1.6 (capability); D. C. Montgomery, *Introduction to Statistical Quality
 * Control*; Western Electric *Statistical Quality Control Handbook* (1956); L. S. Nelson, J. Quality
 * Technology 16(4), 1984.
 */
import { z } from 'zod';

/** Chart kinds accepted by the evaluator. */
export const SPC_CHARTS = ['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum', 'p', 'np', 'c', 'u'] as const;
export type SpcChart = (typeof SPC_CHARTS)[number];

/** Western Electric rules 1–4 (WE Handbook 1956) and Nelson tests 1–8 (Nelson 1984). */
export const SPC_RULE_IDS = [
  'we1',
  'we2',
  'we3',
  'we4',
  'nelson1',
  'nelson2',
  'nelson3',
  'nelson4',
  'nelson5',
  'nelson6',
  'nelson7',
  'nelson8',
] as const;
export type SpcRuleId = (typeof SPC_RULE_IDS)[number];

/**
 * Signals that are not selectable run rules but are always reported where the chart has them:
 * a dispersion statistic (R, S or MR) beyond its limits (only when `we1` or `nelson1` is selected),
 * an EWMA statistic beyond its limits, and a CUSUM decision interval crossed (C± > H).
 */
export const SPC_CHART_SIGNALS = [
  'dispersion-ucl',
  'dispersion-lcl',
  'ewma-upper',
  'ewma-lower',
  'cusum-upper',
  'cusum-lower',
] as const;
export type SpcViolationId = SpcRuleId | (typeof SPC_CHART_SIGNALS)[number];

/** Charts whose data are measurements (variables), as opposed to counts (attributes). */
export const SPC_VARIABLES_CHARTS: readonly SpcChart[] = ['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum'];

/** Subgroup sizes covered by the control-chart constants (ASTM E2587 tables run n = 2…25). */
export const SPC_MIN_SUBGROUP_SIZE = 2;
export const SPC_MAX_SUBGROUP_SIZE = 25;
/**
 * Fewest points (subgroups, observations or counts) from which limits are estimated: 2 (one
 * moving range, or two subgroups). This is an arithmetic minimum only — Montgomery recommends
 * 20–25 subgroups for trial limits. When every parameter is known (`target` and `sigma` for
 * variables charts, `target` for attribute charts) one point is enough.
 */
export const SPC_MIN_POINTS_FOR_LIMITS = 2;
/** Most points accepted in one request. */
export const SPC_MAX_POINTS = 100_000;

const finite = z.number();

/** The body of `POST /api/v1/spc/evaluate` (see the module comment and product brief §6). */
export const SpcEvaluateInputSchema = z
  .object({
    chart: z.enum(SPC_CHARTS),
    /** Subgroups of measurements (xbar-r, xbar-s; ewma/cusum on subgroup means). */
    subgroups: z.array(z.array(finite).min(1)).max(SPC_MAX_POINTS).optional(),
    /** Individual measurements (imr, ewma, cusum). */
    values: z.array(finite).max(SPC_MAX_POINTS).optional(),
    /** Nonconforming units (p, np) or nonconformities (c, u) per sample. */
    counts: z.array(z.number().int().min(0)).max(SPC_MAX_POINTS).optional(),
    /** Sample sizes (p, np: units inspected; u: inspection units, may be fractional). */
    sizes: z.array(z.number().positive()).max(SPC_MAX_POINTS).optional(),
    /** 1-based inclusive range of the points that set the limits; default all points. */
    phase1: z.object({ first: z.number().int().min(1), last: z.number().int().min(1) }).optional(),
    /**
     * Known centre: the process target μ0 for variables charts; the standard fraction p0 for
     * p and np; c0 per sample for c; u0 per unit for u.
     */
    target: finite.optional(),
    /** Known process standard deviation σ of one observation (variables charts only). */
    sigma: z.number().positive().optional(),
    /** EWMA weight λ, 0 < λ ≤ 1 (default 0.2). */
    lambda: z.number().gt(0).lte(1).optional(),
    /** EWMA limit width L in sigmas of the statistic (default 3). */
    L: z.number().positive().max(10).optional(),
    /** EWMA limits: exact time-varying (default) or asymptotic. */
    limits: z.enum(['exact', 'asymptotic']).optional(),
    /** CUSUM reference value k in sigma units (default 0.5). */
    k: z.number().min(0).max(10).optional(),
    /** CUSUM decision interval h in sigma units (default 5). */
    h: z.number().positive().max(50).optional(),
    /** CUSUM fast-initial-response head start in sigma units (e.g. h/2); 0 ≤ headStart < h. */
    headStart: z.number().min(0).optional(),
    /** Run rules to apply (default `["we1"]`, a point beyond the control limits). */
    rules: z.array(z.enum(SPC_RULE_IDS)).max(SPC_RULE_IDS.length).optional(),
    /** Specification limits for capability (variables charts); at least one of lsl/usl. */
    spec: z.object({ lsl: finite.optional(), usl: finite.optional(), target: finite.optional() }).optional(),
    /** Confidence level of the capability intervals (default 0.95). */
    confidence: z.number().gt(0.5).lt(1).optional(),
  })
  .superRefine((input, ctx) => {
    const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path, message });
    const { chart } = input;
    const variables = SPC_VARIABLES_CHARTS.includes(chart);
    const allKnown = variables ? input.target !== undefined && input.sigma !== undefined : input.target !== undefined;
    const minPoints = allKnown ? 1 : SPC_MIN_POINTS_FOR_LIMITS;

    const allowed: Record<SpcChart, readonly ('subgroups' | 'values' | 'counts' | 'sizes')[]> = {
      'xbar-r': ['subgroups'],
      'xbar-s': ['subgroups'],
      imr: ['values'],
      ewma: ['subgroups', 'values'],
      cusum: ['subgroups', 'values'],
      p: ['counts', 'sizes'],
      np: ['counts', 'sizes'],
      c: ['counts'],
      u: ['counts', 'sizes'],
    };
    for (const field of ['subgroups', 'values', 'counts', 'sizes'] as const) {
      if (input[field] !== undefined && !allowed[chart].includes(field)) {
        issue([field], `"${field}" is not used by the ${chart} chart (it takes ${allowed[chart].join(' + ')})`);
      }
    }

    let pointCount: number | null = null;
    if (chart === 'xbar-r' || chart === 'xbar-s' || ((chart === 'ewma' || chart === 'cusum') && input.subgroups !== undefined)) {
      const subgroups = input.subgroups;
      if (!subgroups) {
        issue(['subgroups'], `the ${chart} chart needs "subgroups" (an array of arrays of measurements)`);
      } else {
        pointCount = subgroups.length;
        if (subgroups.length < minPoints) issue(['subgroups'], `at least ${minPoints} subgroups are needed`);
        const size = subgroups[0]?.length ?? 0;
        subgroups.forEach((sg, i) => {
          if (sg.length < SPC_MIN_SUBGROUP_SIZE || sg.length > SPC_MAX_SUBGROUP_SIZE) {
            issue(['subgroups', i], `subgroup size must be ${SPC_MIN_SUBGROUP_SIZE}…${SPC_MAX_SUBGROUP_SIZE}, got ${sg.length}`);
          } else if (sg.length !== size) {
            issue(['subgroups', i], `all subgroups must have the same size (${size}); subgroup ${i + 1} has ${sg.length}`);
          }
        });
        if ((chart === 'ewma' || chart === 'cusum') && input.values !== undefined) {
          issue(['values'], 'give either "values" or "subgroups", not both');
        }
      }
    } else if (chart === 'imr' || chart === 'ewma' || chart === 'cusum') {
      if (!input.values) {
        issue(['values'], `the ${chart} chart needs "values" (an array of measurements)`);
      } else {
        pointCount = input.values.length;
        if (input.values.length < minPoints) issue(['values'], `at least ${minPoints} values are needed`);
      }
    } else {
      const counts = input.counts;
      if (!counts) {
        issue(['counts'], `the ${chart} chart needs "counts"`);
      } else {
        pointCount = counts.length;
        if (counts.length < minPoints) issue(['counts'], `at least ${minPoints} counts are needed`);
        if (chart !== 'c') {
          const sizes = input.sizes;
          if (!sizes) {
            issue(['sizes'], `the ${chart} chart needs "sizes" (one per count)`);
          } else if (sizes.length !== counts.length) {
            issue(['sizes'], `"sizes" has ${sizes.length} entries but "counts" has ${counts.length}`);
          } else {
            sizes.forEach((n, i) => {
              if ((chart === 'p' || chart === 'np') && !Number.isInteger(n))
                issue(['sizes', i], 'the number of units inspected must be a whole number');
              if (chart === 'np' && n !== sizes[0])
                issue(['sizes', i], 'the np chart needs one constant sample size (use a p chart for varying sizes)');
            });
            counts.forEach((d, i) => {
              const n = sizes[i];
              if ((chart === 'p' || chart === 'np') && n !== undefined && d > n)
                issue(['counts', i], `count ${d} exceeds the sample size ${n}`);
            });
          }
        }
      }
    }

    if (input.phase1 && pointCount !== null) {
      const { first, last } = input.phase1;
      if (first > last) issue(['phase1', 'first'], `phase1.first (${first}) is after phase1.last (${last})`);
      if (last > pointCount) issue(['phase1', 'last'], `phase1.last (${last}) is beyond the ${pointCount} points posted`);
      if (!allKnown && last - first + 1 < SPC_MIN_POINTS_FOR_LIMITS) {
        issue(['phase1'], `phase 1 must hold at least ${SPC_MIN_POINTS_FOR_LIMITS} points to estimate limits`);
      }
    }

    if (!variables) {
      if (input.sigma !== undefined)
        issue(['sigma'], `"sigma" does not apply to the ${chart} chart (its spread follows from the centre)`);
      if (input.spec !== undefined) issue(['spec'], 'capability needs measurements; attribute charts take no "spec"');
      if (input.target !== undefined) {
        if ((chart === 'p' || chart === 'np') && !(input.target > 0 && input.target < 1))
          issue(['target'], 'the standard fraction nonconforming must be between 0 and 1');
        if ((chart === 'c' || chart === 'u') && !(input.target > 0))
          issue(['target'], 'the standard count rate must be positive');
      }
    }
    if (chart !== 'ewma') {
      for (const f of ['lambda', 'L', 'limits'] as const)
        if (input[f] !== undefined) issue([f], `"${f}" applies to the ewma chart only`);
    }
    if (chart !== 'cusum') {
      for (const f of ['k', 'h', 'headStart'] as const)
        if (input[f] !== undefined) issue([f], `"${f}" applies to the cusum chart only`);
    } else if (input.headStart !== undefined && !(input.headStart < (input.h ?? 5))) {
      issue(['headStart'], 'the head start must be below the decision interval h');
    }

    if (input.spec) {
      const { lsl, usl, target } = input.spec;
      if (lsl === undefined && usl === undefined) issue(['spec'], 'give at least one of "lsl" and "usl"');
      if (lsl !== undefined && usl !== undefined && !(lsl < usl)) issue(['spec', 'usl'], 'usl must be above lsl');
      if (target !== undefined && ((lsl !== undefined && target < lsl) || (usl !== undefined && target > usl))) {
        issue(['spec', 'target'], 'the target must lie within the specification limits');
      }
    }
    if (input.rules) {
      const seen = new Set<string>();
      input.rules.forEach((r, i) => {
        if (seen.has(r)) issue(['rules', i], `rule "${r}" is listed twice`);
        seen.add(r);
      });
    }
  });

/** A validated evaluation request. Optional fields take the defaults documented above. */
export type SpcEvaluateInput = z.infer<typeof SpcEvaluateInputSchema>;

/** Centre line and control limits of one chart (same units as the plotted statistic). */
export interface SpcLimits {
  center: number;
  ucl: number;
  lcl: number;
}

/** One plotted point. */
export interface SpcPoint {
  /** 1-based position in the posted data. */
  index: number;
  /** The plotted statistic: x̄, x, the EWMA statistic z, p, np, c or u; for CUSUM the observation (or subgroup mean). */
  value: number;
  /** Centre line at this point. */
  center: number;
  /** Control limits at this point (they vary with the sample size, or with time for exact EWMA limits). */
  ucl: number;
  lcl: number;
  /** R, S or MR where the chart has a dispersion chart (null for the first MR and elsewhere). */
  dispersionValue: number | null;
  /** Rules and chart signals that complete at this point. */
  violations: SpcViolationId[];
  /** True when the point lies in the phase-1 range that set the limits. */
  inPhase1: boolean;
  /** Sample size behind the point (subgroup size, or units inspected for attribute charts). */
  size: number;
  /** EWMA only: the observation (or subgroup mean) that fed the statistic. */
  observation?: number;
  /** CUSUM only: upper and lower cumulative sums C⁺, C⁻ (data units) and their run lengths N⁺, N⁻. */
  cPlus?: number;
  cMinus?: number;
  nPlus?: number;
  nMinus?: number;
  /** CUSUM only: estimate of the shifted mean when the point signals (μ0 + K + C⁺/N⁺ or μ0 − K − C⁻/N⁻), else null. */
  shiftEstimate?: number | null;
}

/** A phase-1 point suggested for exclusion (never applied by the evaluator). */
export interface SpcSuggestedExclusion {
  index: number;
  /** Round of the iterative recomputation in which the point fell outside (1 = the first limits). */
  iteration: number;
  reason: string;
}

/** A two-sided confidence interval. */
export interface SpcInterval {
  lower: number;
  upper: number;
  confidence: number;
}

/** Expected fraction out of specification, in parts per million. */
export interface SpcPpm {
  belowLsl: number | null;
  aboveUsl: number | null;
  total: number;
}

/** Anderson–Darling normality check. */
export interface SpcNormality {
  method: 'anderson-darling';
  n: number;
  a2: number;
  /** A²·(1 + 0.75/n + 2.25/n²) (D'Agostino & Stephens 1986, mean and variance estimated). */
  a2Adjusted: number;
  pValue: number;
  /** True when p ≥ 0.05. */
  normalAt5Percent: boolean;
}

/** Lag-1 autocorrelation check. */
export interface SpcAutocorrelation {
  n: number;
  lag1: number;
  /** The ±2/√n band that white noise stays inside about 95 % of the time. */
  threshold: number;
  warning: string | null;
}

/** Capability against the specification (null parts are undefined for one-sided specs). */
export interface SpcCapability {
  lsl: number | null;
  usl: number | null;
  target: number | null;
  n: number;
  mean: number;
  sigmaWithin: number;
  sigmaOverall: number;
  cp: number | null;
  cpk: number | null;
  cpu: number | null;
  cpl: number | null;
  pp: number | null;
  ppk: number | null;
  ppu: number | null;
  ppl: number | null;
  cpm: number | null;
  cpInterval: SpcInterval | null;
  cpkInterval: SpcInterval | null;
  /** Chan–Cheng–Spiring / Boyles χ² interval for Cpm (from the overall s; null without both limits). */
  cpmInterval?: SpcInterval | null;
  /** How σ_within was estimated and the (effective) degrees of freedom the Cp/Cpk intervals used. */
  sigmaBasis?: { method: 'sample-sd' | 'rbar' | 'sbar' | 'mrbar' | 'given'; degreesOfFreedom: number };
  ppmWithin: SpcPpm | null;
  ppmOverall: SpcPpm | null;
  normality: SpcNormality | null;
  autocorrelation: SpcAutocorrelation | null;
}

/** Parameters that were used (given or estimated), for display and for saving as an approved limit set. */
export interface SpcParameters {
  /** Centre of the process (μ0, p̄, c̄ or ū). */
  center: number;
  /** Process sigma of one observation (variables charts), null for attribute charts. */
  sigma: number | null;
  /** Whether the centre and sigma were given or estimated from phase 1. */
  centerSource: 'given' | 'phase1';
  sigmaSource: 'given' | 'phase1' | null;
  /** Subgroup size (1 for individuals; the mean sample size for attribute charts). */
  subgroupSize: number;
  lambda?: number;
  L?: number;
  ewmaLimits?: 'exact' | 'asymptotic';
  k?: number;
  h?: number;
  /** CUSUM reference value and decision interval in data units (K = kσ, H = hσ of the plotted value). */
  K?: number;
  H?: number;
  headStart?: number;
}

/** The response of `POST /api/v1/spc/evaluate`. */
export interface SpcEvaluateOutput {
  chart: SpcChart;
  /** Location/statistic chart. For variable sample sizes (p, u) the limits at the mean sample size; for CUSUM {0, H, −H}. */
  limits: SpcLimits;
  /** R, S or MR chart, or null. */
  dispersion: SpcLimits | null;
  /** σ̂ within (R̄/d2, s̄/c4, MR̄/d2, or the given σ); null for attribute charts. */
  sigmaWithin: number | null;
  points: SpcPoint[];
  capability: SpcCapability | null;
  /** The phase-1 range and the exclusions suggested for it; null when judged against an approved limit set (phase II). */
  phase1: { first: number; last: number; suggestedExclusions: SpcSuggestedExclusion[] } | null;
  parameters: SpcParameters;
  rules: SpcRuleId[];
  /** Plain-words remarks (e.g. which selected rules do not apply to this chart). */
  notes: string[];
}

/**
 * An approved limit set (phase II): what an engineer confirmed after phase I, stored per
 * characteristic and used to judge new data without re-estimating anything.
 * `center`, `ucl`, `lcl` are the centre line and limits of the plotted statistic at `subgroupSize`
 * (for p and u charts the per-point limits are recomputed from `center` and each sample size:
 * p̄ ± 3√(p̄(1−p̄)/nᵢ), ū ± 3√(ū/nᵢ)). `sigma` is the process σ of one observation (variables
 * charts; null for attribute charts). EWMA and CUSUM sets carry their design parameters.
 */
export const SpcLimitSetSchema = z
  .object({
    chart: z.enum(SPC_CHARTS),
    center: finite,
    ucl: finite,
    lcl: finite,
    sigma: z.number().positive().nullable(),
    subgroupSize: z.number().positive(),
    dispersion: z.object({ center: finite, ucl: finite, lcl: finite }).nullable(),
    lambda: z.number().gt(0).lte(1).optional(),
    L: z.number().positive().optional(),
    ewmaLimits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().min(0).optional(),
    h: z.number().positive().optional(),
    headStart: z.number().min(0).optional(),
  })
  .superRefine((ls, ctx) => {
    if (!(ls.lcl <= ls.center && ls.center <= ls.ucl))
      ctx.addIssue({ code: 'custom', path: ['ucl'], message: 'limits must satisfy lcl ≤ center ≤ ucl' });
    if (SPC_VARIABLES_CHARTS.includes(ls.chart) && ls.sigma === null)
      ctx.addIssue({ code: 'custom', path: ['sigma'], message: 'variables charts need the process sigma' });
    if ((ls.chart === 'xbar-r' || ls.chart === 'xbar-s' || ls.chart === 'imr') && ls.dispersion === null) {
      ctx.addIssue({ code: 'custom', path: ['dispersion'], message: `the ${ls.chart} chart needs dispersion limits` });
    }
  });
export type SpcLimitSet = z.infer<typeof SpcLimitSetSchema>;
