/**
 * Run rules for Shewhart-type charts: Western Electric rules 1–4 (Western Electric Co.,
 * *Statistical Quality Control Handbook*, 1956, §1-B) and Nelson tests 1–8 (L. S. Nelson,
 * "The Shewhart control chart — tests for special causes", J. Quality Technology 16(4), 1984),
 * as also tabulated in NIST/SEMATECH e-Handbook §6.3.2 and Montgomery §5.3.6.
 *
 * Zones are measured in sigmas of the plotted statistic around a FIXED centre line (the phase-1
 * or approved limits, never limits that move with the data being judged). Where limits vary by
 * point (p and u charts with varying sample size, exact EWMA limits) each point is judged with
 * its own sigma, σᵢ = (UCLᵢ − centreᵢ)/3.
 *
 * Edge conventions (decided here, documented for users):
 * - "Beyond" is strict: a point exactly on a limit or zone line is NOT beyond it (so it is
 *   "within" for Nelson test 7 and not "outside zone C" for Nelson test 8).
 * - A point exactly on the centre line is on neither side: it breaks a same-side run (WE 4,
 *   Nelson 2) and does not count towards a same-side "k of m" rule.
 * - "Six points steadily increasing or decreasing" (Nelson 3) means five consecutive strict
 *   increases (or decreases) — six points; equal neighbours (ties) break a trend.
 * - "Fourteen points alternating up and down" (Nelson 4) means thirteen consecutive non-zero
 *   differences whose signs alternate; a tie breaks the alternation.
 * - "k of m" rules (WE 2/3, Nelson 5/6) complete on a point that is itself beyond the zone line
 *   and brings the count in the last m points (fewer at the start of the series) to k.
 * - Nelson 8 ("eight points in a row with none in zone C") counts points beyond 1σ on either
 *   side; it does not insist that both sides occur.
 * - Each violation is reported on the point where the rule completes; a pattern that goes on
 *   (a tenth point on the same side) keeps signalling on every further point.
 * - Zone rules need a positive sigma; with σ = 0 (no spread at all) only rule 1 is applied.
 */
import type { SpcRuleId } from '../../shared/spc.ts';

/** What a run rule needs to know about one plotted point. */
export interface RulePoint {
  value: number;
  center: number;
  ucl: number;
  lcl: number;
  /** Sigma of the plotted statistic at this point. */
  sigma: number;
}

type Side = 1 | -1 | 0;

function side(p: RulePoint): Side {
  if (p.value > p.center) return 1;
  if (p.value < p.center) return -1;
  return 0;
}

/** Side (+1 above, −1 below) on which the point lies strictly beyond k sigmas, or 0. */
function beyond(p: RulePoint, k: number): Side {
  if (!(p.sigma > 0)) return 0;
  const dev = p.value - p.center;
  if (dev > k * p.sigma) return 1;
  if (dev < -k * p.sigma) return -1;
  return 0;
}

function kOfM(points: readonly RulePoint[], i: number, k: number, m: number, zone: number): boolean {
  const here = points[i];
  if (!here) return false;
  const s = beyond(here, zone);
  if (s === 0) return false;
  let count = 0;
  for (let j = Math.max(0, i - m + 1); j <= i; j += 1) {
    const p = points[j];
    if (p && beyond(p, zone) === s) count += 1;
  }
  return count >= k;
}

function sameSideRun(points: readonly RulePoint[], i: number, length: number): boolean {
  if (i + 1 < length) return false;
  const here = points[i];
  if (!here) return false;
  const s = side(here);
  if (s === 0) return false;
  for (let j = i - length + 1; j <= i; j += 1) {
    const p = points[j];
    if (!p || side(p) !== s) return false;
  }
  return true;
}

function diffSign(points: readonly RulePoint[], j: number): Side {
  const a = points[j - 1];
  const b = points[j];
  if (!a || !b) return 0;
  if (b.value > a.value) return 1;
  if (b.value < a.value) return -1;
  return 0;
}

function beyondLimits(p: RulePoint): boolean {
  return p.value > p.ucl || p.value < p.lcl;
}

/**
 * Whether `rule` completes at point i (0-based) of `points`.
 * Rule statements (all against the fixed centre line and the point's own sigma):
 * we1 / nelson1: one point beyond the 3σ control limits; we2 / nelson5: two of three consecutive
 * points beyond 2σ on the same side; we3 / nelson6: four of five beyond 1σ on the same side;
 * we4: eight consecutive points on one side; nelson2: nine consecutive points on one side;
 * nelson3: six points steadily increasing or decreasing; nelson4: fourteen points alternating up
 * and down; nelson7: fifteen consecutive points within 1σ (either side); nelson8: eight consecutive
 * points beyond 1σ (either side).
 */
export function ruleCompletesAt(points: readonly RulePoint[], i: number, rule: SpcRuleId): boolean {
  const here = points[i];
  if (!here) return false;
  switch (rule) {
    case 'we1': // Western Electric rule 1
    case 'nelson1': // Nelson test 1
      return beyondLimits(here);
    case 'we2': // Western Electric rule 2
    case 'nelson5': // Nelson test 5
      return kOfM(points, i, 2, 3, 2);
    case 'we3': // Western Electric rule 3
    case 'nelson6': // Nelson test 6
      return kOfM(points, i, 4, 5, 1);
    case 'we4': // Western Electric rule 4
      return sameSideRun(points, i, 8);
    case 'nelson2': // Nelson test 2
      return sameSideRun(points, i, 9);
    case 'nelson3': {
      // Nelson test 3: six points → five consecutive differences of one strict sign.
      if (i < 5) return false;
      const s = diffSign(points, i);
      if (s === 0) return false;
      for (let j = i - 4; j <= i; j += 1) if (diffSign(points, j) !== s) return false;
      return true;
    }
    case 'nelson4': {
      // Nelson test 4: fourteen points → thirteen non-zero differences alternating in sign.
      if (i < 13) return false;
      for (let j = i - 12; j <= i; j += 1) {
        const s = diffSign(points, j);
        if (s === 0) return false;
        if (j > i - 12 && s !== -diffSign(points, j - 1)) return false;
      }
      return true;
    }
    case 'nelson7': {
      // Nelson test 7: fifteen points in a row within 1σ of the centre line (on the line counts as within).
      if (i < 14) return false;
      for (let j = i - 14; j <= i; j += 1) {
        const p = points[j];
        if (!p || !(p.sigma > 0) || beyond(p, 1) !== 0) return false;
      }
      return true;
    }
    case 'nelson8': {
      // Nelson test 8: eight points in a row beyond 1σ, either side (none in zone C).
      if (i < 7) return false;
      for (let j = i - 7; j <= i; j += 1) {
        const p = points[j];
        if (!p || beyond(p, 1) === 0) return false;
      }
      return true;
    }
  }
}

/**
 * Evaluate the selected run rules on a series of points; returns, per point, the ids of the rules
 * that complete there (in the order the rules were selected). See the module comment for the
 * edge conventions.
 */
export function evaluateRunRules(points: readonly RulePoint[], rules: readonly SpcRuleId[]): SpcRuleId[][] {
  return points.map((_, i) => rules.filter((rule) => ruleCompletesAt(points, i, rule)));
}
