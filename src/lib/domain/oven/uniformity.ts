/**
 * Oven temperature-uniformity survey: hottest and coldest (corrected) reading minus setpoint
 * over the stabilised soak, and the uniformity class from a configurable class table.
 *
 * The default table is the furnace-class table of SAE AMS2750 revision G (Pyrometry), used here
 * as a published template for a lens-lab cure oven: class 1 ±3 °C, 2 ±6, 3 ±8, 4 ±10, 5 ±14,
 * 6 ±28. Revision F differs in class 2 (±5 °C) and class 3 (±7 °C).
 */
import type { UniformityResult } from '../../shared/surveys.ts';

export type { UniformityResult };

/** One row of a uniformity class table: the class and its ±tolerance in °C. */
export interface UniformityClass {
  class: number;
  toleranceC: number;
}

/** AMS2750G furnace classes (°C): 1 ±3, 2 ±6, 3 ±8, 4 ±10, 5 ±14, 6 ±28. */
export const AMS2750G_CLASSES: readonly UniformityClass[] = [
  { class: 1, toleranceC: 3 },
  { class: 2, toleranceC: 6 },
  { class: 3, toleranceC: 8 },
  { class: 4, toleranceC: 10 },
  { class: 5, toleranceC: 14 },
  { class: 6, toleranceC: 28 },
];

/** AMS2750F furnace classes (°C): 1 ±3, 2 ±5, 3 ±7, 4 ±10, 5 ±14, 6 ±28. */
export const AMS2750F_CLASSES: readonly UniformityClass[] = [
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
  /** Class table; default {@link AMS2750G_CLASSES}. */
  classTable?: readonly UniformityClass[] | undefined;
}

/**
 * Uniformity survey: hottest = max(reading + correction) − setpoint, coldest =
 * min(reading + correction) − setpoint over readings from `stabilisedFromIndex`; class = the
 * smallest-tolerance row with |hottest| ≤ tol and |coldest| ≤ tol (inclusive).
 * Source: SAE AMS2750G furnace classes (template; configurable). Units °C.
 * @throws RangeError on no sensors, a sensor without stabilised readings, or non-finite values.
 */
export function uniformitySurvey(input: UniformityInput): UniformityResult {
  const { setpointC, sensors } = input;
  const from = input.stabilisedFromIndex ?? 0;
  const table = [...(input.classTable ?? AMS2750G_CLASSES)].sort((a, b) => a.toleranceC - b.toleranceC);
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
