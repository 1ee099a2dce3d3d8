/**
 * A control-limit study (Phase I) on a characteristic's baseline subgroups, with the points an
 * engineer excluded for an assignable cause (Montgomery, *Introduction to SQC*, §6.2.1 "revising
 * the trial limits"; NIST/SEMATECH e-Handbook §6.3.1). The SPC library supplies the maths:
 *
 * - Suggestions: the library's iterative exclusion on the WHOLE baseline (`evaluateSpc`), shown to
 *   the engineer and never applied by themselves.
 * - Limits: centre and σ estimated from the INCLUDED points only, on the Shewhart chart of the data
 *   (X̄-R / X̄-S / I-MR; for EWMA and CUSUM the X̄-R chart of subgroups or the I-MR chart of single
 *   values, as the evaluator does). For I-MR, moving ranges that span an excluded point are left out.
 *   EWMA and CUSUM limits are then the standards-given design with that centre and σ.
 * - Trial judgement: every baseline point judged against those limits with the selected rules.
 * - Capability: on the included observations, σ_within from the chart, against the spec.
 */
import { capabilityStudy } from '../spc/capability.ts';
import { sampleSd } from '../spc/math.ts';
import { evaluateAgainstLimitSet, evaluateSpc, limitSetFromEvaluation, sigmaBasisOf } from '../spc/evaluate.ts';
import { suggestExclusions } from '../spc/phase1.ts';
import {
  estimateShewhartLimits,
  shewhartOutsideReason,
  shewhartStatistics,
  standardsGivenLimits,
  type ShewhartChart,
} from '../spc/shewhart.ts';
import type { ChartParams, CharacteristicChart, SpecLimits } from '../../shared/characteristics.ts';
import {
  SpcEvaluateInputSchema,
  type SpcCapability,
  type SpcEvaluateOutput,
  type SpcLimitSet,
  type SpcPoint,
  type SpcRuleId,
  type SpcSuggestedExclusion,
} from '../../shared/spc.ts';
import { dataFor } from './phase2.ts';

export interface StudyDesign {
  chart: CharacteristicChart;
  params: ChartParams;
  rules: readonly SpcRuleId[];
  spec: SpecLimits | null;
}

export interface StudyOutcome {
  limitSet: SpcLimitSet;
  /** Every baseline point judged against the trial limits. */
  points: SpcPoint[];
  suggested: SpcSuggestedExclusion[];
  capability: SpcCapability | null;
  includedPoints: number;
  notes: string[];
  evaluation: Pick<SpcEvaluateOutput, 'parameters' | 'notes'>;
}

/** Why a study cannot be computed, with the field it concerns. */
export class StudyError extends Error {
  constructor(
    public path: string,
    message: string,
  ) {
    super(message);
  }
}

/** Fewest included points that can set limits (the arithmetic minimum; 20–25 are recommended). */
export const STUDY_MIN_POINTS = 2;
/** Points below which the study carries a caution (Montgomery recommends 20–25 subgroups). */
export const STUDY_RECOMMENDED_POINTS = 20;

/**
 * Compute a study. `subgroups` are the baseline's subgroups in time order (each of the
 * characteristic's size n); `excluded` holds 1-based positions within the baseline.
 */
export function runStudy(
  design: StudyDesign,
  subgroups: readonly (readonly number[])[],
  excluded: ReadonlySet<number>,
): StudyOutcome {
  const { chart, params, rules } = design;
  const data = dataFor(chart, subgroups);
  const spec = design.spec && (design.spec.lsl !== undefined || design.spec.usl !== undefined) ? design.spec : null;
  const request = {
    chart,
    ...data,
    rules: [...rules],
    ...(chart === 'ewma' ? { lambda: params.lambda, L: params.L, limits: params.limits } : {}),
    ...(chart === 'cusum' ? { k: params.k, h: params.h, headStart: params.headStart } : {}),
  };
  const parsed = SpcEvaluateInputSchema.safeParse(request);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new StudyError('baselineFrom', `The baseline cannot be charted: ${first?.message ?? 'invalid data'}.`);
  }
  const whole = evaluateSpc(parsed.data);
  const n = subgroups[0]?.length ?? 1;
  const underlying: ShewhartChart =
    chart === 'imr' || chart === 'xbar-r' || chart === 'xbar-s' ? chart : n > 1 ? 'xbar-r' : 'imr';
  const stats = shewhartStatistics(underlying, dataFor(underlying, subgroups));
  // Suggestions: the library's iteration; with an overall σ basis, the same iteration (the
  // library's `suggestExclusions`) on limits from the overall σ of the remaining points.
  const suggested =
    params.sigmaBasis === 'overall'
      ? suggestExclusions(
          stats.map((_, i) => i),
          (inc) => {
            const obs = inc.flatMap((i) => [...(subgroups[i] ?? [])]);
            const centre = inc.reduce((a, i) => a + stats[i]!.value, 0) / Math.max(1, inc.length);
            return standardsGivenLimits(underlying, centre, sampleSd(obs), n);
          },
          (ls, i) => (ls.sigma !== null && ls.sigma > 0 && stats[i] ? shewhartOutsideReason(ls, stats[i]) : null),
        )
      : (whole.phase1?.suggestedExclusions ?? []);

  const included: number[] = [];
  for (let i = 0; i < subgroups.length; i += 1) if (!excluded.has(i + 1)) included.push(i);
  for (const idx of excluded) {
    if (idx < 1 || idx > subgroups.length)
      throw new StudyError('exclusions', `Point ${idx} is not in the baseline (it holds ${subgroups.length} points).`);
  }
  if (included.length < STUDY_MIN_POINTS) {
    throw new StudyError(
      'exclusions',
      `At least ${STUDY_MIN_POINTS} points must remain to set limits; ${included.length} remain.`,
    );
  }
  const est = estimateShewhartLimits(underlying, stats, included);
  if (!(est.sigma !== null && est.sigma > 0)) {
    throw new StudyError(
      'exclusions',
      underlying === 'imr'
        ? 'The included points give no spread (no moving range between two consecutive included points, or all values equal).'
        : 'The included subgroups give no spread (all ranges are zero).',
    );
  }
  let limitSet: SpcLimitSet;
  let evaluation: Pick<SpcEvaluateOutput, 'parameters' | 'notes'>;
  const extraNotes: string[] = [];
  if (params.sigmaBasis === 'overall') {
    // σ from the overall sample standard deviation of the included observations, limits as
    // "standards given" (centre ± 3σ/√n with the matching dispersion limits): for characteristics
    // that drift by design between adjustments.
    const overall = sampleSd(included.flatMap((i) => [...(subgroups[i] ?? [])]));
    if (!(overall > 0)) throw new StudyError('exclusions', 'The included points give no spread (all values equal).');
    const given = evaluateSpc(SpcEvaluateInputSchema.parse({ ...request, target: est.center, sigma: overall }));
    limitSet = limitSetFromEvaluation(given);
    evaluation = { parameters: { ...given.parameters, centerSource: 'phase1', sigmaSource: 'phase1' }, notes: given.notes };
    extraNotes.push(
      `σ here is the overall standard deviation of the baseline (${Number(overall.toPrecision(4))}), not the short-term σ within (${Number(est.sigma.toPrecision(4))}): the limits mark unusual excursions of a process that drifts by design between adjustments, not the drift itself.`,
    );
  } else if (chart === 'imr' || chart === 'xbar-r' || chart === 'xbar-s') {
    const { centerSource, sigmaSource, ...ls } = est;
    void centerSource;
    void sigmaSource;
    limitSet = ls;
    evaluation = {
      parameters: {
        center: est.center,
        sigma: est.sigma,
        centerSource: 'phase1',
        sigmaSource: 'phase1',
        subgroupSize: est.subgroupSize,
      },
      notes: whole.notes,
    };
  } else {
    const given = evaluateSpc(SpcEvaluateInputSchema.parse({ ...request, target: est.center, sigma: est.sigma }));
    limitSet = limitSetFromEvaluation(given);
    evaluation = { parameters: { ...given.parameters, centerSource: 'phase1', sigmaSource: 'phase1' }, notes: given.notes };
  }
  const judged = evaluateAgainstLimitSet(data, limitSet, { rules });
  const points = judged.points.map((p, i) => ({ ...p, inPhase1: !excluded.has(i + 1) }));

  let capability: SpcCapability | null = null;
  if (spec) {
    const observations = included.flatMap((i) => [...(subgroups[i] ?? [])]);
    capability = capabilityStudy(observations, est.sigma, spec, {
      series: included.map((i) => stats[i]!.value),
      sigmaBasis: sigmaBasisOf(underlying, included.length, n, false, observations.length),
    });
  }
  const notes: string[] = [...extraNotes];
  if (included.length < STUDY_RECOMMENDED_POINTS) {
    notes.push(
      `Only ${included.length} points set these limits; ${STUDY_RECOMMENDED_POINTS}–25 are recommended for trial limits (Montgomery §6.2.1).`,
    );
  }
  return { limitSet, points, suggested, capability, includedPoints: included.length, notes, evaluation };
}
