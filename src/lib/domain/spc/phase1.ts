/**
 * Phase I: trial limits from a chosen range of points, and iterative exclusion of points that
 * fall outside them, returned as SUGGESTIONS for an engineer to confirm (Montgomery, *Introduction
 * to SQC*, §5.3 and §6.2.1 "revising the trial limits"; NIST/SEMATECH e-Handbook §6.3.1). Nothing
 * here removes a point from the limits it returns: the caller's limits always come from the whole
 * phase-1 range until someone approves an exclusion.
 */
import type { SpcSuggestedExclusion } from '../../shared/spc.ts';

/** Most recomputation rounds before the search stops. */
export const MAX_EXCLUSION_ITERATIONS = 25;

/**
 * Iterative exclusion: estimate limits from `candidates` (0-based indexes), flag every remaining
 * point whose `outside` reason is not null, drop the flagged points, re-estimate, and repeat until
 * nothing is flagged, fewer than `minPoints` would remain, or MAX_EXCLUSION_ITERATIONS rounds.
 * Returns the flagged points with 1-based `index` and the round (`iteration`, 1 = the first trial
 * limits) in which they fell outside.
 */
export function suggestExclusions<L>(
  candidates: readonly number[],
  estimate: (included: readonly number[]) => L,
  outside: (limits: L, index: number) => string | null,
  minPoints = 2,
): SpcSuggestedExclusion[] {
  const suggestions: SpcSuggestedExclusion[] = [];
  let remaining = [...candidates];
  for (let iteration = 1; iteration <= MAX_EXCLUSION_ITERATIONS; iteration += 1) {
    if (remaining.length < minPoints) break;
    const limits = estimate(remaining);
    const flagged: SpcSuggestedExclusion[] = [];
    for (const i of remaining) {
      const reason = outside(limits, i);
      if (reason !== null) flagged.push({ index: i + 1, iteration, reason });
    }
    if (flagged.length === 0) break;
    if (remaining.length - flagged.length < minPoints) {
      suggestions.push(...flagged);
      break;
    }
    suggestions.push(...flagged);
    const drop = new Set(flagged.map((f) => f.index - 1));
    remaining = remaining.filter((i) => !drop.has(i));
  }
  return suggestions;
}

/** The 0-based indexes first−1 … last−1 of a 1-based inclusive range. */
export function rangeIndexes(first: number, last: number): number[] {
  const out: number[] = [];
  for (let i = first - 1; i <= last - 1; i += 1) out.push(i);
  return out;
}
