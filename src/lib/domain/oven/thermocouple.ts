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
 * Provenance: every IEC row and every E230 row below agrees with public reproductions of the
 * two tables (sensor and wire makers' tolerance pages quoting IEC 60584-2 / IEC 60584-1:2013 and
 * ASTM E230/E230M Table 1, e.g. the E230-12 summary "Tolerance classes for thermocouples
 * according to ASTM E230/E230M-12", 2014); the purchased standard governs.
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
 * Checked against a public reproduction of the IEC 60584 class table (see the module note).
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
 * ASTM E230 Table 1 limits (°C, reference junction 0 °C), 0 °C and above (fraction = percent/100):
 * J 0…760 standard ±2.2 or 0.75 %, special ±1.1 or 0.4 %; K and N 0…1260 standard ±2.2 or
 * 0.75 %, special ±1.1 or 0.4 %; T 0…370 standard ±1.0 or 0.75 %, special ±0.5 or 0.4 %;
 * E 0…870 standard ±1.7 or 0.5 %, special ±1.0 or 0.4 %.
 * Checked against public reproductions of E230 Table 1 (see the module note). Sub-zero limits
 * are not tabled here.
 */
export const ASTM_E230_LIMITS: Readonly<Record<ThermocoupleType, Record<AstmE230Grade, ToleranceRow>>> = {
  J: {
    standard: { fromC: 0, toC: 760, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 760, fixedC: 1.1, fraction: 0.004 },
  },
  K: {
    standard: { fromC: 0, toC: 1260, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 1260, fixedC: 1.1, fraction: 0.004 },
  },
  N: {
    standard: { fromC: 0, toC: 1260, fixedC: 2.2, fraction: 0.0075 },
    special: { fromC: 0, toC: 1260, fixedC: 1.1, fraction: 0.004 },
  },
  T: {
    standard: { fromC: 0, toC: 370, fixedC: 1.0, fraction: 0.0075 },
    special: { fromC: 0, toC: 370, fixedC: 0.5, fraction: 0.004 },
  },
  E: {
    standard: { fromC: 0, toC: 870, fixedC: 1.7, fraction: 0.005 },
    special: { fromC: 0, toC: 870, fixedC: 1.0, fraction: 0.004 },
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
