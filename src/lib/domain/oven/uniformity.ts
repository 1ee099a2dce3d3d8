/**
 * Oven temperature-uniformity survey: hottest and coldest (corrected) reading minus setpoint
 * over the stabilised soak, and the uniformity class from a configurable class table.
 *
 * The default table is the furnace-class table of SAE AMS2750 (Pyrometry), revision F, Table 11
 * ("Furnace class uniformity tolerances"), used here as a published template for a lens-lab cure
 * oven: class 1 ±3.0 °C, 2 ±6.0, 3 ±8.0, 4 ±10.0, 5 ±14.0, 6 ±28.0 (±5, 10, 15, 20, 25, 50 °F).
 * A note to that table says some design authorities require ±5.0 °C for class 2 and ±7.0 °C for
 * class 3: {@link AMS2750_TIGHTER_C_CLASSES}. (Checked against public summaries of Table 11; the
 * purchased standard governs.)
 */
import type { UniformityResult } from '../../shared/surveys.ts';

export type { UniformityResult };

/** One row of a uniformity class table: the class and its ±tolerance in °C. */
export interface UniformityClass {
  class: number;
  toleranceC: number;
}

/** AMS2750F Table 11 furnace classes (°C): 1 ±3, 2 ±6, 3 ±8, 4 ±10, 5 ±14, 6 ±28. */
export const AMS2750_CLASSES: readonly UniformityClass[] = [
  { class: 1, toleranceC: 3 },
  { class: 2, toleranceC: 6 },
  { class: 3, toleranceC: 8 },
  { class: 4, toleranceC: 10 },
  { class: 5, toleranceC: 14 },
  { class: 6, toleranceC: 28 },
];

/**
 * The tighter °C variant named in the note to AMS2750F Table 11 (some design authorities):
 * 1 ±3, 2 ±5, 3 ±7, 4 ±10, 5 ±14, 6 ±28. Not a different revision's table.
 */
export const AMS2750_TIGHTER_C_CLASSES: readonly UniformityClass[] = [
  { class: 1, toleranceC: 3 },
  { class: 2, toleranceC: 5 },
  { class: 3, toleranceC: 7 },
  { class: 4, toleranceC: 10 },
  { class: 5, toleranceC: 14 },
  { class: 6, toleranceC: 28 },
];

/** One survey sensor. */
export interface SurveySensor {
  name: string;
  /** Readings over the survey, °C. */
  readingsC: readonly number[];
  /** Correction to add to every reading (from the sensor's calibration), °C; default 0. */
  correctionC?: number | undefined;
}

/** Inputs of `POST /api/v1/calc/uniformity`. */
export interface UniformityInput {
  setpointC: number;
  sensors: readonly SurveySensor[];
  /** First reading index of the stabilised soak (earlier readings are ignored); default 0. */
  stabilisedFromIndex?: number | undefined;
  /** Class table; default {@link AMS2750_CLASSES}. */
  classTable?: readonly UniformityClass[] | undefined;
}

/**
 * Uniformity survey: hottest = max(reading + correction) − setpoint, coldest =
 * min(reading + correction) − setpoint over readings from `stabilisedFromIndex`; class = the
 * smallest-tolerance row with |hottest| ≤ tol and |coldest| ≤ tol (inclusive).
 * Source: SAE AMS2750F Table 11 furnace classes (template; configurable). Units °C.
 * @throws RangeError on no sensors, a sensor without stabilised readings, or non-finite values.
 */
export function uniformitySurvey(input: UniformityInput): UniformityResult {
  const { setpointC, sensors } = input;
  const from = input.stabilisedFromIndex ?? 0;
  const table = [...(input.classTable ?? AMS2750_CLASSES)].sort((a, b) => a.toleranceC - b.toleranceC);
  if (!Number.isFinite(setpointC)) throw new RangeError('setpointC must be finite');
  if (sensors.length === 0) throw new RangeError('a survey needs at least one sensor');
  if (!Number.isInteger(from) || from < 0) throw new RangeError('stabilisedFromIndex must be a whole number ≥ 0');
  let hot = -Infinity;
  let cold = Infinity;
  let hotName = '';
  let coldName = '';
  for (const s of sensors) {
    const readings = s.readingsC.slice(from);
    if (readings.length === 0) throw new RangeError(`sensor ${s.name} has no readings in the stabilised soak`);
    const corr = s.correctionC ?? 0;
    for (const r of readings) {
      if (!Number.isFinite(r)) throw new RangeError(`sensor ${s.name} has a non-finite reading`);
      const v = r + corr;
      if (v > hot) {
        hot = v;
        hotName = s.name;
      }
      if (v < cold) {
        cold = v;
        coldName = s.name;
      }
    }
  }
  const hottestDeviationC = hot - setpointC;
  const coldestDeviationC = cold - setpointC;
  const worst = Math.max(Math.abs(hottestDeviationC), Math.abs(coldestDeviationC));
  // Small epsilon so that a reading exactly on the tolerance is not lost to float rounding.
  const row = table.find((c) => worst <= c.toleranceC + 1e-9);
  const result: UniformityResult = {
    hottestDeviationC,
    coldestDeviationC,
    hottestSensor: hotName,
    coldestSensor: coldName,
    uniformityClass: row ? row.class : null,
    classToleranceC: row ? row.toleranceC : null,
  };
  if (!row) result.message = 'outside every class';
  return result;
}
