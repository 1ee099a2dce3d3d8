/**
 * Bayer abrasion ratio (ASTM F735, oscillating-sand abrasion of transparent plastics and
 * coatings): R = haze gain of the uncoated CR-39 reference ÷ haze gain of the test lens.
 * R = 1 means as abrasion-resistant as uncoated CR-39; ≥ 4 is called premium (common practice
 * of lens labs).
 */

/** Ratio at or above which a hard coat is called premium: 4 (common practice). */
export const BAYER_PREMIUM_RATIO = 4;

/** Inputs of the abrasion ratio, haze gains in haze percentage points. */
export interface AbrasionInput {
  /** Haze gain (after − before) of the uncoated CR-39 reference, %. */
  referenceHazeGainPct: number;
  /** Haze gain (after − before) of the test lens, %. */
  testHazeGainPct: number;
}

/** Result of the abrasion ratio. */
export interface AbrasionResult {
  /** Bayer ratio, dimensionless. */
  bayerRatio: number;
  /** True when the ratio is ≥ 4 (common practice). */
  premium: boolean;
}

/**
 * Bayer ratio = reference haze gain ÷ test haze gain (ASTM F735).
 * @throws RangeError when the test gain is not > 0 (the ratio would be undefined or
 *   meaningless) or the reference gain is not > 0.
 */
export function bayerRatio(input: AbrasionInput): AbrasionResult {
  const { referenceHazeGainPct: ref, testHazeGainPct: test } = input;
  if (!Number.isFinite(test) || test <= 0) {
    throw new RangeError('testHazeGainPct must be greater than 0: a test lens without haze gain gives no ratio');
  }
  if (!Number.isFinite(ref) || ref <= 0) {
    throw new RangeError('referenceHazeGainPct must be greater than 0');
  }
  const r = ref / test;
  return { bayerRatio: r, premium: r >= BAYER_PREMIUM_RATIO };
}

/**
 * Haze gain = haze after − haze before abrasion, in haze percentage points (ASTM F735 uses
 * haze per ASTM D1003).
 */
export function hazeGain(beforePct: number, afterPct: number): number {
  if (!Number.isFinite(beforePct) || !Number.isFinite(afterPct)) throw new RangeError('haze values must be finite');
  return afterPct - beforePct;
}
