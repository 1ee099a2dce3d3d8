/**
 * Characteristics and control-limit studies: what gets charted, how its
 * subgroups are formed from channels (rational subgrouping — never raw 1 Hz samples, which are
 * autocorrelated and would flood a Shewhart chart with false signals; Montgomery, *Introduction
 * to SQC*, §5.3.4 on rational subgroups), which chart and run rules judge it, and against which
 * specification its capability is reported. The zod schemas here validate the engineer's form in
 * the browser, the API and the seed alike.
 */
import { z } from 'zod';
import { SPC_RULE_IDS, type SpcCapability, type SpcEvaluateOutput, type SpcRuleId, type SpcSuggestedExclusion } from './spc.ts';

/** Chart types a characteristic may use (variables charts: characteristics are measurements). */
export const CHARACTERISTIC_CHARTS = ['imr', 'xbar-r', 'xbar-s', 'ewma', 'cusum'] as const;
export type CharacteristicChart = (typeof CHARACTERISTIC_CHARTS)[number];

export const CHART_LABELS: Record<CharacteristicChart, string> = {
  imr: 'Individuals and moving range (I-MR)',
  'xbar-r': 'Subgroup mean and range (X̄-R)',
  'xbar-s': 'Subgroup mean and standard deviation (X̄-S)',
  ewma: 'Exponentially weighted moving average (EWMA)',
  cusum: 'Tabular CUSUM',
};

/** Short names of the statistic and of the companion dispersion chart. */
export const CHART_STATISTIC: Record<CharacteristicChart, { value: string; dispersion: string | null }> = {
  imr: { value: 'Individual value', dispersion: 'Moving range' },
  'xbar-r': { value: 'Subgroup mean', dispersion: 'Range' },
  'xbar-s': { value: 'Subgroup mean', dispersion: 'Standard deviation' },
  ewma: { value: 'EWMA statistic', dispersion: null },
  cusum: { value: 'Cumulative sums', dispersion: null },
};

/** Plain-words statement of each run rule (Western Electric 1956; Nelson 1984). */
export const RULE_LABELS: Record<SpcRuleId, string> = {
  we1: 'WE 1: one point beyond the 3σ control limits',
  we2: 'WE 2: two of three points beyond 2σ on one side',
  we3: 'WE 3: four of five points beyond 1σ on one side',
  we4: 'WE 4: eight points in a row on one side of the centre',
  nelson1: 'Nelson 1: one point beyond the 3σ control limits',
  nelson2: 'Nelson 2: nine points in a row on one side of the centre',
  nelson3: 'Nelson 3: six points steadily increasing or decreasing',
  nelson4: 'Nelson 4: fourteen points alternating up and down',
  nelson5: 'Nelson 5: two of three points beyond 2σ on one side',
  nelson6: 'Nelson 6: four of five points beyond 1σ on one side',
  nelson7: 'Nelson 7: fifteen points in a row within 1σ',
  nelson8: 'Nelson 8: eight points in a row beyond 1σ on either side',
};

/** Plain words for the signals that are not selectable rules. */
export const SIGNAL_LABELS: Record<string, string> = {
  'dispersion-ucl': 'spread above its upper control limit',
  'dispersion-lcl': 'spread below its lower control limit',
  'ewma-upper': 'EWMA above its upper control limit',
  'ewma-lower': 'EWMA below its lower control limit',
  'cusum-upper': 'upper cumulative sum beyond the decision interval',
  'cusum-lower': 'lower cumulative sum beyond the decision interval',
};

/** Plain words for any violation id. */
export function violationLabel(id: string): string {
  return (RULE_LABELS as Record<string, string>)[id] ?? SIGNAL_LABELS[id] ?? id;
}

/** Keys of the process window whose min/max/target can serve as the specification. */
export const WINDOW_SPEC_KEYS = ['withdrawalSpeedMmS', 'viscosityMm2S', 'bathTempC', 'roomRhPct', 'cureSetpointC'] as const;
export type WindowSpecKey = (typeof WINDOW_SPEC_KEYS)[number];
export const WINDOW_SPEC_LABELS: Record<WindowSpecKey, string> = {
  withdrawalSpeedMmS: 'Withdrawal speed (mm/s)',
  viscosityMm2S: 'Bath viscosity (mm²/s)',
  bathTempC: 'Bath temperature (°C)',
  roomRhPct: 'Room relative humidity (%)',
  cureSetpointC: 'Cure setpoint (°C)',
};

/**
 * How subgroups are formed (the subgroup size n is a separate field):
 * - `per-dip-stroke`: each reading of the source channel is one stroke's mean (the line gateway
 *   publishes one value per stroke); n consecutive strokes form a subgroup.
 * - `per-oven-load`: one value per closed oven load — the mean of the source channels' readings
 *   during the load's soak; n = 1.
 * - `per-n-minutes`: clock windows of `minutes` (aligned to the epoch, so 10 → :00, :10, :20 …).
 *   `first`: the first n readings of each window form its subgroup (it closes on the n-th
 *   reading; the rest of the window is not used). `means`: when the window ends, its readings are
 *   split into n consecutive blocks of (nearly) equal count and each block's mean is one member
 *   of the subgroup (a window with fewer than n readings gives no subgroup).
 * - `per-manual-check`: each reading is one check's value (a gateway or an operator posts one
 *   value per check); readings closer than `minSpacingMinutes` to the last check taken are not
 *   new checks (so a continuously streaming inline sensor is sampled like a check). n = 1.
 */
export const SubgroupRuleSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('per-dip-stroke') }).strict(),
  z.object({ kind: z.literal('per-oven-load') }).strict(),
  z
    .object({
      kind: z.literal('per-n-minutes'),
      minutes: z.number().int('Whole minutes.').min(1, 'At least 1 minute.').max(1440, 'At most 1440 minutes (a day).'),
      mode: z.enum(['first', 'means']),
    })
    .strict(),
  z
    .object({
      kind: z.literal('per-manual-check'),
      minSpacingMinutes: z.number().min(0, 'Cannot be negative.').max(1440, 'At most 1440 minutes.'),
    })
    .strict(),
]);
export type SubgroupRule = z.infer<typeof SubgroupRuleSchema>;
export type SubgroupRuleKind = SubgroupRule['kind'];

export const SUBGROUP_RULE_LABELS: Record<SubgroupRuleKind, string> = {
  'per-dip-stroke': 'Per dip stroke',
  'per-oven-load': 'Per oven load (mean during soak)',
  'per-n-minutes': 'Per N minutes',
  'per-manual-check': 'Per check',
};

/** Plain-words description of a rule and size, e.g. "first 5 readings of each 10-minute window". */
export function describeSubgroupRule(rule: SubgroupRule, n: number): string {
  switch (rule.kind) {
    case 'per-dip-stroke':
      return n === 1 ? 'one point per dip stroke (the stroke’s mean speed)' : `${n} consecutive dip strokes per subgroup`;
    case 'per-oven-load':
      return 'one point per oven load (mean during the soak)';
    case 'per-n-minutes':
      return rule.mode === 'first'
        ? `first ${n} reading${n === 1 ? '' : 's'} of each ${rule.minutes}-minute window`
        : `${n} block mean${n === 1 ? '' : 's'} of each ${rule.minutes}-minute window`;
    case 'per-manual-check':
      return rule.minSpacingMinutes > 0
        ? `one point per check (at least ${rule.minSpacingMinutes} min apart)`
        : 'one point per check';
  }
}

const finite = (what: string) => z.number({ error: `${what} must be a number.` });

/** Specification for capability and for drawing LSL/USL. */
export const SpecSourceSchema = z.discriminatedUnion('mode', [
  z.object({ mode: z.literal('none') }).strict(),
  z
    .object({
      mode: z.literal('fixed'),
      lsl: finite('LSL').optional(),
      usl: finite('USL').optional(),
      target: finite('Target').optional(),
    })
    .strict()
    .superRefine((s, ctx) => {
      if (s.lsl === undefined && s.usl === undefined)
        ctx.addIssue({ code: 'custom', path: ['lsl'], message: 'Give at least one of LSL and USL.' });
      if (s.lsl !== undefined && s.usl !== undefined && !(s.lsl < s.usl))
        ctx.addIssue({ code: 'custom', path: ['usl'], message: 'USL must be above LSL.' });
      if (s.target !== undefined && ((s.lsl !== undefined && s.target < s.lsl) || (s.usl !== undefined && s.target > s.usl))) {
        ctx.addIssue({ code: 'custom', path: ['target'], message: 'The target must lie within the specification limits.' });
      }
    }),
  z.object({ mode: z.literal('window'), key: z.enum(WINDOW_SPEC_KEYS) }).strict(),
]);
export type SpecSource = z.infer<typeof SpecSourceSchema>;

/** Resolved specification limits (data units). */
export interface SpecLimits {
  lsl?: number;
  usl?: number;
  target?: number;
}

/** EWMA and CUSUM design (defaults as in the evaluator: λ 0.2, L 3, exact limits; k 0.5, h 5). */
export const ChartParamsSchema = z
  .object({
    lambda: z.number().gt(0, 'λ must be above 0.').lte(1, 'λ is at most 1.').optional(),
    L: z.number().positive().max(10).optional(),
    limits: z.enum(['exact', 'asymptotic']).optional(),
    k: z.number().min(0).max(10).optional(),
    h: z.number().positive().max(50).optional(),
    headStart: z.number().min(0).optional(),
    /**
     * Where σ comes from: `within` (default; R̄/d2, s̄/c4 or MR̄/d2 — Shewhart's short-term
     * variation) or `overall` (the sample standard deviation of the baseline's observations). Use
     * `overall` only for a characteristic that drifts by design between adjustments (a bath
     * topped up by hand): its limits then mark unusual excursions, not the drift itself.
     */
    sigmaBasis: z.enum(['within', 'overall']).optional(),
  })
  .strict();
export type ChartParams = z.infer<typeof ChartParamsSchema>;

/** Create or edit a characteristic. */
export const CharacteristicInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the characteristic a name.').max(120),
    description: z.string().trim().max(2000).default(''),
    channelIds: z
      .array(z.number().int().positive(), { error: 'Choose the source channel(s).' })
      .min(1, 'Choose at least one source channel.')
      .max(8, 'At most 8 source channels.'),
    subgroupRule: SubgroupRuleSchema,
    subgroupSize: z.number().int('A whole number.').min(1).max(25, 'At most 25 (the constants tables stop there).'),
    chart: z.enum(CHARACTERISTIC_CHARTS),
    chartParams: ChartParamsSchema.default({}),
    rules: z.array(z.enum(SPC_RULE_IDS)).max(SPC_RULE_IDS.length).default(['we1']),
    spec: SpecSourceSchema.default({ mode: 'none' }),
    unit: z.string().trim().min(1, 'Give the unit (e.g. mm/s).').max(20),
    active: z.boolean().default(true),
    /**
     * On creation only: plot points from this many days of stored readings (or closed oven loads)
     * so a baseline can be studied at once. Default 14; 0 starts the chart empty. Ignored on edit.
     */
    backfillDays: z.number().int('Whole days.').min(0).max(60, 'At most 60 days.').optional(),
  })
  .strict()
  .superRefine((c, ctx) => {
    const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path, message });
    if (c.chart === 'imr' && c.subgroupSize !== 1) issue(['subgroupSize'], 'The individuals chart takes subgroups of 1.');
    if ((c.chart === 'xbar-r' || c.chart === 'xbar-s') && c.subgroupSize < 2)
      issue(['subgroupSize'], 'X̄ charts need subgroups of 2 to 25.');
    if ((c.subgroupRule.kind === 'per-oven-load' || c.subgroupRule.kind === 'per-manual-check') && c.subgroupSize !== 1) {
      issue(
        ['subgroupSize'],
        'One load or one check is one observation: use a subgroup size of 1 (an individuals, EWMA or CUSUM chart).',
      );
    }
    if (new Set(c.channelIds).size !== c.channelIds.length) issue(['channelIds'], 'A channel is listed twice.');
    const seen = new Set<string>();
    c.rules.forEach((r, i) => {
      if (seen.has(r)) issue(['rules', i], `Rule ${r} is listed twice.`);
      seen.add(r);
    });
    if (c.chart !== 'ewma')
      for (const f of ['lambda', 'L', 'limits'] as const)
        if (c.chartParams[f] !== undefined) issue(['chartParams', f], 'Applies to the EWMA chart only.');
    if (c.chart !== 'cusum')
      for (const f of ['k', 'h', 'headStart'] as const)
        if (c.chartParams[f] !== undefined) issue(['chartParams', f], 'Applies to the CUSUM chart only.');
    if (c.chart === 'cusum' && c.chartParams.headStart !== undefined && !(c.chartParams.headStart < (c.chartParams.h ?? 5))) {
      issue(['chartParams', 'headStart'], 'The head start must be below the decision interval h.');
    }
  });
export type CharacteristicInput = z.input<typeof CharacteristicInputSchema>;
export type CharacteristicFields = z.output<typeof CharacteristicInputSchema>;

/** A stored characteristic as the API returns it. */
export interface Characteristic extends CharacteristicFields {
  id: number;
  assetId: number;
  assetName: string;
  channels: { id: number; name: string; unit: string; assetId: number }[];
  createdAt: string;
  updatedAt: string;
}

/** One excluded baseline point and the engineer's reason. */
export const ExclusionSchema = z
  .object({
    index: z.number().int().positive(),
    reason: z.string().trim().min(3, 'Say why this point is excluded (an assignable cause).').max(500),
  })
  .strict();
export type Exclusion = z.infer<typeof ExclusionSchema>;

const isoTime = z.iso.datetime({ offset: true, error: 'An ISO 8601 date-time with a zone, e.g. 2026-12-01T08:00:00Z.' });

/** A control-limit study: the baseline period, the excluded points with reasons. */
export const StudyInputSchema = z
  .object({
    baselineFrom: isoTime,
    baselineTo: isoTime,
    exclusions: z.array(ExclusionSchema).max(10_000).default([]),
    note: z.string().trim().max(2000).default(''),
  })
  .strict()
  .superRefine((s, ctx) => {
    if (!(Date.parse(s.baselineFrom) < Date.parse(s.baselineTo)))
      ctx.addIssue({ code: 'custom', path: ['baselineTo'], message: 'The baseline must end after it starts.' });
    const seen = new Set<number>();
    s.exclusions.forEach((e, i) => {
      if (seen.has(e.index))
        ctx.addIssue({ code: 'custom', path: ['exclusions', i, 'index'], message: `Point ${e.index} is excluded twice.` });
      seen.add(e.index);
    });
  });
export type StudyInput = z.input<typeof StudyInputSchema>;

/** The meanings a limit-set signature may carry. */
export const LIMIT_SIGNATURE_MEANINGS = ['approved'] as const;

/** Approve a drafted limit set with an electronic signature. */
export const ApproveLimitSetSchema = z
  .object({
    password: z.string().min(1, 'Enter your password.').max(200),
    meaning: z.enum(LIMIT_SIGNATURE_MEANINGS, { error: 'The meaning of this signature must be "approved".' }),
    /** When the limits take effect (default: now). Not before the latest point already judged. */
    effectiveFrom: isoTime.optional(),
  })
  .strict();
export type ApproveLimitSet = z.infer<typeof ApproveLimitSetSchema>;

/** Query of the chart data. */
export const ChartQuerySchema = z
  .object({
    from: isoTime.optional(),
    to: isoTime.optional(),
    /** Most recent N points when no range is given (default 200). */
    last: z.coerce.number().int().min(1).max(20_000).optional(),
  })
  .strict();

export type LimitSetStatus = 'draft' | 'approved' | 'superseded';

/** A stored limit set as the API returns it. */
export interface LimitSetView {
  id: number;
  characteristicId: number;
  version: number;
  status: LimitSetStatus;
  chart: CharacteristicChart;
  center: number;
  ucl: number;
  lcl: number;
  dispersion: { center: number; ucl: number; lcl: number } | null;
  sigma: number | null;
  n: number;
  params: ChartParams;
  baselineFrom: string;
  baselineTo: string;
  baselineFirstIndex: number | null;
  baselineLastIndex: number | null;
  baselinePoints: number;
  excluded: Exclusion[];
  suggested: SpcSuggestedExclusion[];
  capability: SpcCapability | null;
  note: string;
  effectiveFrom: string | null;
  effectiveFromMs: number | null;
  approvedSignature: {
    userId: number;
    username: string;
    displayName: string;
    meaning: string;
    signedAt: string;
    seeded?: boolean;
  } | null;
  approvedAt: string | null;
  seeded: boolean;
  createdAt: string;
}

/** One plotted point of a characteristic's chart. */
export interface ChartPoint {
  id: number;
  index: number;
  tMs: number;
  tFromMs: number | null;
  value: number;
  observation: number;
  dispersion: number | null;
  n: number;
  center: number | null;
  ucl: number | null;
  lcl: number | null;
  violations: string[];
  limitSetId: number | null;
  excluded: boolean;
  exclusionReason: string | null;
  dipRunId: number | null;
  ovenLoadId: number | null;
  extra: { cPlus?: number; cMinus?: number; nPlus?: number; nMinus?: number; shiftEstimate?: number | null };
}

/** Live `points` event payload (brief contract) plus what the chart needs to draw it. */
export interface LivePointEvent {
  characteristicId: number;
  index: number;
  value: number;
  violations: string[];
  tMs: number;
  point?: ChartPoint;
}

/** Everything the control-chart view draws. */
export interface ChartData {
  characteristic: Characteristic;
  points: ChartPoint[];
  limitSets: LimitSetView[];
  spec: SpecLimits | null;
  specNote: string | null;
  capability: SpcCapability | null;
  capabilityBasis: string | null;
  totalPoints: number;
  timeZone: string;
}

/** The trial result of a study (nothing is stored). */
export interface StudyResult {
  characteristicId: number;
  baselineFrom: string;
  baselineTo: string;
  /** Every baseline point with its trial judgement. */
  points: (ChartPoint & { trialViolations: string[]; excludedInStudy: boolean })[];
  /** Trial limits from the included points. */
  limits: { center: number; ucl: number; lcl: number };
  dispersion: { center: number; ucl: number; lcl: number } | null;
  sigma: number | null;
  n: number;
  params: ChartParams;
  /** The library's Phase I suggestions on the whole baseline (never applied automatically). */
  suggested: SpcSuggestedExclusion[];
  exclusions: Exclusion[];
  capability: SpcCapability | null;
  spec: SpecLimits | null;
  includedPoints: number;
  notes: string[];
  evaluation: Pick<SpcEvaluateOutput, 'parameters' | 'notes'>;
}
