/**
 * Phase II monitoring, one subgroup at a time: judge new subgroups against an APPROVED limit set
 * without estimating anything (Montgomery, *Introduction to SQC*, §5.3 and §6.2: phase II uses
 * the limits established in phase I). The maths is the SPC library's `evaluateAgainstLimitSet`;
 * this module decides what history it needs and keeps the shapes straight.
 *
 * Conventions (documented for users):
 * - Run rules look back only over points judged under the same limit set: a new approval starts
 *   the rules afresh (rules run only against fixed limits).
 * - Shewhart charts need at most the 14 preceding points (Nelson 7 spans 15 points, Nelson 4
 *   14); EWMA and CUSUM statistics are recursive, so they are replayed from the first point of
 *   the set (z₀ = centre, C±₀ = head start at the set's first point).
 * - Individuals: the moving range of the first point under a set is not defined (no previous
 *   observation under that set).
 */
import { evaluateAgainstLimitSet } from '../spc/evaluate.ts';
import type { SpcLimitSet, SpcPoint, SpcRuleId } from '../../shared/spc.ts';

/** Preceding points a Shewhart chart needs for every run rule (Nelson 7: 15 points in a row). */
export const SHEWHART_HISTORY = 14;

/** Whether the chart's statistic is recursive (needs every point since the set took effect). */
export function isRecursiveChart(chart: SpcLimitSet['chart']): boolean {
  return chart === 'ewma' || chart === 'cusum';
}

/** How many preceding subgroups under the same set `judgeSubgroups` needs (null: all of them). */
export function historyNeeded(chart: SpcLimitSet['chart']): number | null {
  return isRecursiveChart(chart) ? null : SHEWHART_HISTORY;
}

/** The SPC data shape of subgroups for a chart: values for n = 1 (I-MR, EWMA, CUSUM), else subgroups. */
export function dataFor(
  chart: SpcLimitSet['chart'],
  subgroups: readonly (readonly number[])[],
): { values?: number[]; subgroups?: number[][] } {
  const n = subgroups[0]?.length ?? 1;
  if (chart === 'imr' || ((chart === 'ewma' || chart === 'cusum') && n === 1))
    return { values: subgroups.map((s) => s[0] as number) };
  return { subgroups: subgroups.map((s) => [...s]) };
}

/**
 * Judge `next` subgroups (oldest first) against `limitSet` with `rules`, given the `history` of
 * subgroups already judged under the same set (oldest first; the last SHEWHART_HISTORY suffice for
 * Shewhart charts, all of them for EWMA and CUSUM). Returns one SpcPoint per new subgroup with its
 * `index` counted from 1 at the set's first point.
 */
export function judgeSubgroups(
  limitSet: SpcLimitSet,
  rules: readonly SpcRuleId[],
  history: readonly (readonly number[])[],
  next: readonly (readonly number[])[],
): SpcPoint[] {
  if (next.length === 0) return [];
  const keep = historyNeeded(limitSet.chart);
  const prior = keep === null ? history : history.slice(Math.max(0, history.length - keep));
  const all = [...prior, ...next];
  const out = evaluateAgainstLimitSet(dataFor(limitSet.chart, all), limitSet, { rules });
  const offset = keep === null ? 0 : history.length - prior.length;
  return out.points.slice(prior.length).map((p) => ({ ...p, index: p.index + offset }));
}
