/**
 * The SPC evaluator behind `POST /api/v1/spc/evaluate` (product brief §6): one pure function
 * from a validated request to limits, points, signals, phase-1 exclusion suggestions and
 * capability; plus the phase-II counterpart that judges data against an approved limit set.
 *
 * Defaults: rules `["we1"]`; EWMA λ = 0.2, L = 3, exact limits; CUSUM k = 0.5, h = 5, no head start;
 * phase 1 = all points; confidence 0.95.
 *
 * Where the centre and sigma come from (Montgomery, *Introduction to SQC*, ch. 6–9; NIST/SEMATECH
 * e-Handbook §6.3.2):
 * - X̄-R, X̄-S, I-MR, p, np, c, u: phase-1 estimates (x̿ and R̄/d2, s̄/c4, MR̄/d2; p̄, c̄, ū), each
 *   replaced by `target` / `sigma` when given (standards given).
 * - EWMA and CUSUM: centre = `target`, else the phase-1 mean; σ = `sigma`, else MR̄/d2 of the
 *   phase-1 observations (R̄/d2 within subgroups when subgroups are posted; plotted inputs are then
 *   subgroup means with σₓ = σ/√n). NIST §6.3.2.4 uses a given s; §6.3.2.3 gives k and h in data
 *   units — divide them by σ to post them here.
 * - Run rules apply to Shewhart location charts (and, for we1/nelson1, the dispersion chart's
 *   limits); EWMA and CUSUM report their own signals (`ewma-upper/lower`, `cusum-upper/lower`),
 *   because zone tests assume independent points and those statistics are autocorrelated.
 * - Capability (variables charts, when `spec` is given) uses the individual observations of the
 *   phase-1 range, σ_within from the chart and the overall s; the autocorrelation check runs on the
 *   plotted series (x or x̄) of the phase-1 range in time order.
 */
import type {
  SpcChart,
  SpcEvaluateInput,
  SpcEvaluateOutput,
  SpcLimitSet,
  SpcParameters,
  SpcPoint,
  SpcRuleId,
  SpcSuggestedExclusion,
  SpcViolationId,
} from '../../shared/spc.ts';
import { capabilityStudy, type SigmaBasis } from './capability.ts';
import { cusumSeries } from './cusum.ts';
import { ewmaAsymptoticLimits, ewmaSeries } from './ewma.ts';
import { rangeIndexes, suggestExclusions } from './phase1.ts';
import { evaluateRunRules } from './rules.ts';
import {
  estimateShewhartLimits,
  shewhartOutsideReason,
  shewhartPointLimits,
  shewhartStatistics,
  type ShewhartChart,
  type ShewhartStat,
  type SpcData,
} from './shewhart.ts';

/** Rules applied when a request names none: a point beyond the control limits. */
export const DEFAULT_RULES: readonly SpcRuleId[] = ['we1'];
/** EWMA defaults (Montgomery §9.2 recommends 0.05 ≤ λ ≤ 0.25 with L ≈ 3). */
export const DEFAULT_EWMA = { lambda: 0.2, L: 3, limits: 'exact' as const };
/** CUSUM defaults in sigma units (Montgomery §9.1: k = 0.5, h = 4 or 5). */
export const DEFAULT_CUSUM = { k: 0.5, h: 5, headStart: 0 };

/** Number of plotted points the request carries. */
export function pointCount(input: SpcData): number {
  return input.subgroups?.length ?? input.values?.length ?? input.counts?.length ?? 0;
}

function isShewhart(chart: SpcChart): chart is ShewhartChart {
  return chart !== 'ewma' && chart !== 'cusum';
}

function observationsIn(input: SpcData, indexes: readonly number[]): number[] {
  const out: number[] = [];
  for (const i of indexes) {
    const sg = input.subgroups?.[i];
    if (sg) out.push(...sg);
    else {
      const v = input.values?.[i];
      if (v !== undefined) out.push(v);
    }
  }
  return out;
}

function shewhartPoints(
  ls: SpcLimitSet,
  stats: readonly ShewhartStat[],
  rules: readonly SpcRuleId[],
  inPhase1: (i: number) => boolean,
): SpcPoint[] {
  const limits = stats.map((s) => shewhartPointLimits(ls, s));
  const rulePoints = stats.map((s, i) => ({ value: s.value, ...(limits[i] as ReturnType<typeof shewhartPointLimits>) }));
  const hits = evaluateRunRules(rulePoints, rules);
  const checkDispersion = ls.dispersion !== null && (rules.includes('we1') || rules.includes('nelson1'));
  return stats.map((s, i) => {
    const pl = limits[i] as ReturnType<typeof shewhartPointLimits>;
    const violations: SpcViolationId[] = [...(hits[i] ?? [])];
    if (checkDispersion && ls.dispersion && s.dispersion !== null) {
      // Western Electric rule 1 / Nelson test 1 on the R, S or MR chart.
      if (s.dispersion > ls.dispersion.ucl) violations.push('dispersion-ucl');
      if (s.dispersion < ls.dispersion.lcl) violations.push('dispersion-lcl');
    }
    return {
      index: i + 1,
      value: s.value,
      center: pl.center,
      ucl: pl.ucl,
      lcl: pl.lcl,
      dispersionValue: s.dispersion,
      violations,
      inPhase1: inPhase1(i),
      size: s.size,
    };
  });
}

function ruleNotes(chart: SpcChart, rules: readonly SpcRuleId[]): string[] {
  if (chart !== 'ewma' && chart !== 'cusum') return [];
  if (rules.length === 0) return [];
  const signal = chart === 'ewma' ? 'ewma-upper / ewma-lower' : 'cusum-upper / cusum-lower';
  return [
    `Run rules (${rules.join(', ')}) are not applied to the ${chart.toUpperCase()} chart: its statistic is autocorrelated by construction, so zone and run tests would mislead. Its own signal is reported as ${signal}.`,
  ];
}

interface SequentialBasis {
  xs: number[];
  n: number;
  center: number;
  sigma: number;
  centerSource: 'given' | 'phase1';
  sigmaSource: 'given' | 'phase1';
  suggestions: SpcSuggestedExclusion[];
}

/** Inputs, centre and σ for EWMA / CUSUM, with phase-1 exclusion suggestions from the underlying Shewhart chart. */
function sequentialBasis(input: SpcEvaluateInput, phase: readonly number[]): SequentialBasis {
  const underlying: ShewhartChart = input.subgroups ? 'xbar-r' : 'imr';
  const stats = shewhartStatistics(underlying, input);
  const est = estimateShewhartLimits(underlying, stats, phase, {});
  const allKnown = input.target !== undefined && input.sigma !== undefined;
  const what = underlying === 'imr' ? 'individuals/moving-range chart' : 'X̄-R chart';
  const suggestions = allKnown
    ? []
    : suggestExclusions(
        phase,
        (inc) => estimateShewhartLimits(underlying, stats, inc, {}),
        (ls, i) => {
          const s = stats[i];
          const r = s ? shewhartOutsideReason(ls, s) : null;
          return r === null ? null : `${r} (on the ${what} of the phase-1 data that estimates the centre and sigma)`;
        },
      );
  return {
    xs: stats.map((s) => s.value),
    n: underlying === 'imr' ? 1 : (stats[0]?.size ?? 1),
    center: input.target ?? est.center,
    sigma: input.sigma ?? est.sigma ?? 0,
    centerSource: input.target === undefined ? 'phase1' : 'given',
    sigmaSource: input.sigma === undefined ? 'phase1' : 'given',
    suggestions,
  };
}

/**
 * How σ_within of a variables chart was estimated from `points` plotted points, for the
 * capability intervals' effective degrees of freedom: R̄/d2 (X̄-R, and EWMA/CUSUM on subgroups),
 * S̄/c4 (X̄-S), MR̄/d2 (individuals); a given σ keeps the sample-SD default.
 */
export function sigmaBasisOf(
  chart: SpcChart,
  points: number,
  subgroupSize: number,
  sigmaGiven: boolean,
  observations: number,
): SigmaBasis {
  if (sigmaGiven) return { method: 'sample-sd', n: observations };
  if (chart === 'xbar-s') return { method: 'sbar', subgroups: points, size: subgroupSize };
  if (subgroupSize >= 2) return { method: 'rbar', subgroups: points, size: subgroupSize };
  return { method: 'mrbar', observations: points };
}

function capabilityFor(input: SpcEvaluateInput, phase: readonly number[], sigmaWithin: number, series: readonly number[]) {
  if (!input.spec) return null;
  const obs = observationsIn(input, phase);
  const size = input.subgroups ? (input.subgroups[0]?.length ?? 1) : 1;
  return capabilityStudy(obs, sigmaWithin, input.spec, {
    confidence: input.confidence ?? 0.95,
    series: phase.map((i) => series[i]).filter((v): v is number => v !== undefined),
    sigmaBasis: sigmaBasisOf(input.chart, phase.length, size, input.sigma !== undefined, obs.length),
  });
}

/**
 * Evaluate one SPC request (phase I, or standards given). Assumes `SpcEvaluateInputSchema` has
 * validated the input. Limits always come from the whole phase-1 range; points outside them are
 * returned in `phase1.suggestedExclusions` for an engineer to confirm, never dropped silently.
 */
export function evaluateSpc(input: SpcEvaluateInput): SpcEvaluateOutput {
  const rules = [...(input.rules ?? DEFAULT_RULES)];
  const count = pointCount(input);
  const first = input.phase1?.first ?? 1;
  const last = input.phase1?.last ?? count;
  const phase = rangeIndexes(first, last);
  const inPhase1 = (i: number) => i >= first - 1 && i <= last - 1;
  const chart = input.chart;

  if (isShewhart(chart)) {
    const stats = shewhartStatistics(chart, input);
    const known = { target: input.target, sigma: input.sigma };
    const ls = estimateShewhartLimits(chart, stats, phase, known);
    const variables = chart === 'xbar-r' || chart === 'xbar-s' || chart === 'imr';
    const allKnown = variables ? input.target !== undefined && input.sigma !== undefined : input.target !== undefined;
    const suggestedExclusions = allKnown
      ? []
      : suggestExclusions(
          phase,
          (inc) => estimateShewhartLimits(chart, stats, inc, known),
          (l, i) => {
            const s = stats[i];
            return s ? shewhartOutsideReason(l, s) : null;
          },
        );
    const points = shewhartPoints(ls, stats, rules, inPhase1);
    const notes: string[] = [];
    if ((chart === 'p' || chart === 'u') && stats.some((s) => s.size !== ls.subgroupSize)) {
      notes.push(
        `Sample sizes vary: "limits" are drawn at the mean sample size ${Number(ls.subgroupSize.toPrecision(6))}; each point carries its own limits.`,
      );
    }
    const parameters: SpcParameters = {
      center: ls.center,
      sigma: ls.sigma,
      centerSource: ls.centerSource,
      sigmaSource: ls.sigmaSource,
      subgroupSize: ls.subgroupSize,
    };
    return {
      chart,
      limits: { center: ls.center, ucl: ls.ucl, lcl: ls.lcl },
      dispersion: ls.dispersion,
      sigmaWithin: ls.sigma,
      points,
      capability:
        variables && input.spec
          ? capabilityFor(
              input,
              phase,
              ls.sigma ?? 0,
              stats.map((s) => s.value),
            )
          : null,
      phase1: { first, last, suggestedExclusions },
      parameters,
      rules,
      notes,
    };
  }

  const basis = sequentialBasis(input, phase);
  const sigmaX = basis.sigma / Math.sqrt(basis.n);
  const capability = input.spec ? capabilityFor(input, phase, basis.sigma, basis.xs) : null;

  if (chart === 'ewma') {
    const design = {
      center: basis.center,
      sigmaX,
      lambda: input.lambda ?? DEFAULT_EWMA.lambda,
      L: input.L ?? DEFAULT_EWMA.L,
      limits: input.limits ?? DEFAULT_EWMA.limits,
    };
    return {
      chart,
      limits: ewmaAsymptoticLimits(design),
      dispersion: null,
      sigmaWithin: basis.sigma,
      points: ewmaPoints(basis.xs, design, basis.n, inPhase1),
      capability,
      phase1: { first, last, suggestedExclusions: basis.suggestions },
      parameters: {
        center: basis.center,
        sigma: basis.sigma,
        centerSource: basis.centerSource,
        sigmaSource: basis.sigmaSource,
        subgroupSize: basis.n,
        lambda: design.lambda,
        L: design.L,
        ewmaLimits: design.limits,
      },
      rules,
      notes: ruleNotes(chart, rules),
    };
  }

  const design = cusumDesign(input, basis.center, sigmaX);
  return {
    chart,
    limits: { center: 0, ucl: design.H, lcl: -design.H },
    dispersion: null,
    sigmaWithin: basis.sigma,
    points: cusumPoints(basis.xs, design, basis.n, inPhase1),
    capability,
    phase1: { first, last, suggestedExclusions: basis.suggestions },
    parameters: {
      center: basis.center,
      sigma: basis.sigma,
      centerSource: basis.centerSource,
      sigmaSource: basis.sigmaSource,
      subgroupSize: basis.n,
      k: design.k,
      h: design.h,
      K: design.K,
      H: design.H,
      headStart: design.headStartSigma,
    },
    rules,
    notes: ruleNotes(chart, rules),
  };
}

function ewmaPoints(
  xs: readonly number[],
  design: Parameters<typeof ewmaSeries>[1],
  n: number,
  inPhase1: (i: number) => boolean,
): SpcPoint[] {
  return ewmaSeries(xs, design).map((p, i) => ({
    index: i + 1,
    value: p.z,
    center: design.center,
    ucl: p.ucl,
    lcl: p.lcl,
    dispersionValue: null,
    violations: p.signal === 'upper' ? ['ewma-upper'] : p.signal === 'lower' ? ['ewma-lower'] : [],
    inPhase1: inPhase1(i),
    size: n,
    observation: p.x,
  }));
}

function cusumPoints(
  xs: readonly number[],
  design: Parameters<typeof cusumSeries>[1],
  n: number,
  inPhase1: (i: number) => boolean,
): SpcPoint[] {
  return cusumSeries(xs, design).map((p, i) => {
    const violations: SpcViolationId[] = [];
    if (p.upper) violations.push('cusum-upper');
    if (p.lower) violations.push('cusum-lower');
    return {
      index: i + 1,
      value: p.x,
      center: 0,
      ucl: design.H,
      lcl: -design.H,
      dispersionValue: null,
      violations,
      inPhase1: inPhase1(i),
      size: n,
      cPlus: p.cPlus,
      cMinus: p.cMinus,
      nPlus: p.nPlus,
      nMinus: p.nMinus,
      shiftEstimate: p.shiftEstimate,
    };
  });
}

/**
 * The approved limit set an engineer would save from a phase-I evaluation (after confirming or
 * rejecting the suggested exclusions and re-running without the excluded points). For CUSUM the
 * set's centre, ucl and lcl all hold the target μ0: its decision interval lives in k and h.
 */
export function limitSetFromEvaluation(out: SpcEvaluateOutput): SpcLimitSet {
  const p = out.parameters;
  const base: SpcLimitSet = {
    chart: out.chart,
    center: out.chart === 'cusum' ? p.center : out.limits.center,
    ucl: out.chart === 'cusum' ? p.center : out.limits.ucl,
    lcl: out.chart === 'cusum' ? p.center : out.limits.lcl,
    sigma: p.sigma,
    subgroupSize: p.subgroupSize,
    dispersion: out.dispersion,
  };
  if (out.chart === 'ewma') return { ...base, lambda: p.lambda, L: p.L, ewmaLimits: p.ewmaLimits };
  if (out.chart === 'cusum') return { ...base, k: p.k, h: p.h, headStart: p.headStart };
  return base;
}

/**
 * Phase II: judge data against an approved limit set without estimating anything. The data take
 * the same shapes as in `evaluateSpc` (subgroups / values / counts + sizes); the limit set's
 * centre, limits and σ are used as they were approved. For EWMA and CUSUM the set supplies μ0, σ
 * and the design (λ, L, limits mode; k, h, head start). `phase1` is null in the result.
 */
export function evaluateAgainstLimitSet(
  data: SpcData,
  limitSet: SpcLimitSet,
  options: { rules?: readonly SpcRuleId[]; spec?: SpcEvaluateInput['spec']; confidence?: number } = {},
): SpcEvaluateOutput {
  const rules = [...(options.rules ?? DEFAULT_RULES)];
  const chart = limitSet.chart;
  const count = pointCount(data);
  const all = rangeIndexes(1, count);
  const never = () => false;
  const sigma = limitSet.sigma ?? 0;
  const parametersBase: SpcParameters = {
    center: limitSet.center,
    sigma: limitSet.sigma,
    centerSource: 'given',
    sigmaSource: limitSet.sigma === null ? null : 'given',
    subgroupSize: limitSet.subgroupSize,
  };
  const capabilityOf = (series: readonly number[]) =>
    options.spec && (chart === 'xbar-r' || chart === 'xbar-s' || chart === 'imr' || chart === 'ewma' || chart === 'cusum')
      ? capabilityStudy(observationsIn(data, all), sigma, options.spec, { confidence: options.confidence ?? 0.95, series })
      : null;

  if (isShewhart(chart)) {
    const stats = shewhartStatistics(chart, data);
    return {
      chart,
      limits: { center: limitSet.center, ucl: limitSet.ucl, lcl: limitSet.lcl },
      dispersion: limitSet.dispersion,
      sigmaWithin: limitSet.sigma,
      points: shewhartPoints(limitSet, stats, rules, never),
      capability: capabilityOf(stats.map((s) => s.value)),
      phase1: null,
      parameters: parametersBase,
      rules,
      notes: [],
    };
  }
  const stats = shewhartStatistics(data.subgroups ? 'xbar-r' : 'imr', data);
  const xs = stats.map((s) => s.value);
  const n = data.subgroups ? (stats[0]?.size ?? 1) : 1;
  const sigmaX = sigma / Math.sqrt(n);
  if (chart === 'ewma') {
    const design = {
      center: limitSet.center,
      sigmaX,
      lambda: limitSet.lambda ?? DEFAULT_EWMA.lambda,
      L: limitSet.L ?? DEFAULT_EWMA.L,
      limits: limitSet.ewmaLimits ?? DEFAULT_EWMA.limits,
    };
    return {
      chart,
      limits: ewmaAsymptoticLimits(design),
      dispersion: null,
      sigmaWithin: limitSet.sigma,
      points: ewmaPoints(xs, design, n, never),
      capability: capabilityOf(xs),
      phase1: null,
      parameters: { ...parametersBase, lambda: design.lambda, L: design.L, ewmaLimits: design.limits },
      rules,
      notes: ruleNotes(chart, rules),
    };
  }
  const design = cusumDesign(limitSet, limitSet.center, sigmaX);
  return {
    chart,
    limits: { center: 0, ucl: design.H, lcl: -design.H },
    dispersion: null,
    sigmaWithin: limitSet.sigma,
    points: cusumPoints(xs, design, n, never),
    capability: capabilityOf(xs),
    phase1: null,
    parameters: { ...parametersBase, k: design.k, h: design.h, K: design.K, H: design.H, headStart: design.headStartSigma },
    rules,
    notes: ruleNotes(chart, rules),
  };
}

/**
 * Tabular CUSUM design in data units from k, h and the head start given in sigma units
 * (Page 1954; NIST/SEMATECH e-Handbook 6.3.2.3): K = k·σ, H = h·σ, FIR head start = hs·σ; also
 * returns k, h and hs as given, for the report.
 */
function cusumDesign(
  p: { k?: number | undefined; h?: number | undefined; headStart?: number | undefined },
  center: number,
  sigmaX: number,
) {
  const k = p.k ?? DEFAULT_CUSUM.k;
  const h = p.h ?? DEFAULT_CUSUM.h;
  const headStart = p.headStart ?? DEFAULT_CUSUM.headStart;
  return { center, K: k * sigmaX, H: h * sigmaX, headStart: headStart * sigmaX, k, h, headStartSigma: headStart };
}
