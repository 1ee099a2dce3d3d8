/**
 * Thermocouple tolerances.
 *
 * IEC 60584-1 (Thermocouples — EMF specifications and tolerances), tolerance classes: the
 * tolerance is the larger of a fixed value and a fraction of |t| inside the class's
 * temperature range, e.g. type K class 1 ±1.5 °C or ±0.004·|t| from −40 to +1000 °C.
 * ASTM E230 (Temperature-electromotive force tables for standardized thermocouples): standard
 * and special limits of error, the larger of a fixed value and a percentage of t, e.g. type K
 * standard ±2.2 °C or ±0.75 %.
 *
 * The type K values agree with references.md; the other rows are FROM MEMORY (configurable
 * defaults, to be checked against the standards' tables before they are relied on).
 */

/** Thermocouple types covered. */
export type ThermocoupleType = 'K' | 'J' | 'T' | 'N' | 'E';

/** A tolerance row: ±max(fixedC, fraction·|t|) within [fromC, toC]. */
export interface ToleranceRow {
  fromC: number;
  toC: number;
  fixedC: number;
  fraction: number;
}

/** IEC 60584-1 tolerance classes 1, 2, 3. */
export type IecClass = 1 | 2 | 3;

/**
 * IEC 60584-1 tolerance table (°C). K, N: class 1 −40…1000 ±1.5 or 0.004|t|; class 2
 * −40…1200 ±2.5 or 0.0075|t|; class 3 −200…40 ±2.5 or 0.015|t|. J: class 1 −40…750 ±1.5 or
 * 0.004|t|; class 2 −40…750 ±2.5 or 0.0075|t|. T: class 1 −40…350 ±0.5 or 0.004|t|; class 2
 * −40…350 ±1.0 or 0.0075|t|; class 3 −200…40 ±1.0 or 0.015|t|. E: class 1 −40…800 ±1.5 or
 * 0.004|t|; class 2 −40…900 ±2.5 or 0.0075|t|; class 3 −200…40 ±2.5 or 0.015|t|.
 * K class 1/2 values published (references.md); the rest from memory.
 */
export const IEC_60584_TOLERANCES: Readonly<Record<ThermocoupleType, Partial<Record<IecClass, ToleranceRow>>>> = {
  K: {
    1: { fromC: -40, toC: 1000, fixedC: 1.5, fraction: 0.004 },
    2: { fromC: -40, toC: 1200, fixedC: 2.5, fraction: 0.0075 },
    3: { fromC: -200, toC: 40, fixedC: 2.5, fraction: 0.015 },
  },
  N: {
    1: { fromC: -40, toC: 1000, fixedC: 1.5, fraction: 0.004 },
    2: { fromC: -40, toC: 1200, fixedC: 2.5, fraction: 0.0075 },
    3: { fromC: -200, toC: 40, fixedC: 2.5, fraction: 0.015 },
  },
  J: {
    1: { fromC: -40, toC: 750, fixedC: 1.5, fraction: 0.004 },
    2: { fromC: -40, toC: 750, fixedC: 2.5, fraction: 0.0075 },
  },
  T: {
    1: { fromC: -40, toC: 350, fixedC: 0.5, fraction: 0.004 },
    2: { fromC: -40, toC: 350, fixedC: 1.0, fraction: 0.0075 },
    3: { fromC: -200, toC: 40, fixedC: 1.0, fraction: 0.015 },
  },
  E: {
    1: { fromC: -40, toC: 800, fixedC: 1.5, fraction: 0.004 },
    2: { fromC: -40, toC: 900, fixedC: 2.5, fraction: 0.0075 },
    3: { fromC: -200, toC: 40, fixedC: 2.5, fraction: 0.015 },
  },
};

/** ASTM E230 limits of error. */
export type AstmE230Grade = 'standard' | 'special';

/**
 * ASTM E230 limits (°C, reference junction 0 °C), 0 °C and above (fraction = percent/100):
 * J 0…750 standard ±2.2 or 0.75 %, special ±1.1 or 0.4 %; K and N 0…1250 standard ±2.2 or
 * 0.75 %, special ±1.1 or 0.4 %; T 0…350 standard ±1.0 or 0.75 %, special ±0.5 or 0.4 %;
 * E 0…900 standard ±1.7 or 0.5 %, special ±1.0 or 0.4 %.
 * K standard published (references.md); the rest from memory. Sub-zero limits not tabled here.
 */
export const ASTM_E230_LIMITS: Readonly<Record<ThermocoupleType, Record<AstmE230Grade, ToleranceRow>>> = {
  J: {
    standard: { fromC: 0, toC: 750, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 750, fixedC: 1.1, fraction: 0.004 },
  },
  K: {
    standard: { fromC: 0, toC: 1250, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 1250, fixedC: 1.1, fraction: 0.004 },
  },
  N: {
    standard: { fromC: 0, toC: 1250, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 1250, fixedC: 1.1, fraction: 0.004 },
  },
  T: {
    standard: { fromC: 0, toC: 350, fixedC: 1.0, fraction: 0.0075 },
    special: { fromC: 0, toC: 350, fixedC: 0.5, fraction: 0.004 },
  },
  E: {
    standard: { fromC: 0, toC: 900, fixedC: 1.7, fraction: 0.005 },
    special: { fromC: 0, toC: 900, fixedC: 1.0, fraction: 0.004 },
  },
};

/** A tolerance answer: ±toleranceC at the temperature, or null when the class does not cover it. */
export interface ToleranceResult {
  toleranceC: number | null;
  /** The covered range of the class/grade, °C (null when the class does not exist for the type). */
  rangeC: { fromC: number; toC: number } | null;
  reason?: string;
}

function evaluate(row: ToleranceRow | undefined, tempC: number, label: string): ToleranceResult {
  if (!Number.isFinite(tempC)) throw new RangeError('tempC must be finite');
  if (!row) return { toleranceC: null, rangeC: null, reason: `${label} is not defined` };
  const rangeC = { fromC: row.fromC, toC: row.toC };
  if (tempC < row.fromC || tempC > row.toC) {
    return { toleranceC: null, rangeC, reason: `${label} covers ${row.fromC} to ${row.toC} °C only` };
  }
  return { toleranceC: Math.max(row.fixedC, row.fraction * Math.abs(tempC)), rangeC };
}

/**
 * IEC 60584-1 tolerance at a temperature: ±max(fixed, fraction·|t|) °C within the class range
 * (see {@link IEC_60584_TOLERANCES}); null outside it or for a class the type lacks.
 */
export function iecTolerance(type: ThermocoupleType, cls: IecClass, tempC: number): ToleranceResult {
  return evaluate(IEC_60584_TOLERANCES[type][cls], tempC, `IEC 60584-1 type ${type} class ${cls}`);
}

/**
 * ASTM E230 limit of error at a temperature: ±max(fixed, percent·t) °C within the range
 * (see {@link ASTM_E230_LIMITS}); null outside it.
 */
export function astmE230Tolerance(type: ThermocoupleType, grade: AstmE230Grade, tempC: number): ToleranceResult {
  return evaluate(ASTM_E230_LIMITS[type][grade], tempC, `ASTM E230 type ${type} ${grade} limits`);
}
