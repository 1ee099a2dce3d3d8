/**
 * Flow (efflux) cups: efflux seconds → kinematic viscosity ν in mm²/s (= cSt), each cup only
 * inside its valid time window. Outside it the reading is "out of range — use another cup",
 * never extrapolated.
 *
 * Provenance of each constant is recorded per cup (`provenance`):
 * - 'published': the equation and window as published for the standard (ASTM D4212 Zahn and
 *   Shell tables; ASTM D1200 Ford cups 1–2 and the D1200 §11.2 efflux windows), checked against
 *   a published copy of the cup table during development;
 * - 'from memory': recalled values that agree with one secondary (non-standard) table but
 *   could not be checked against the standard's own text. Treat as configurable defaults.
 *
 * The Zahn, Shell and Ford equations (Ford 3–5 included) were also checked against the drain
 * times that a maker of certified viscosity standards tabulates for its standards at 25 °C
 * (Cannon Instrument Co., "Viscosity Standards for Zahn, Shell, and Ford Cups": e.g. the 120
 * mm²/s standard drains in 58 s from Ford 3 and 36 s from Ford 4, the 460 mm²/s one in 40 s from
 * Ford 5); every equation reproduces those viscosities within 4 % (tests/domain/calc). The ISO
 * 2431 and DIN 53211 constants found no such source and stay "from memory": they are defaults,
 * and a reading can carry the lab's own constants from the cup's calibration certificate
 * (`equation`), which then replace them (provenance 'lab').
 */

import { CUP_ID_VALUES, type CupId } from '../../shared/calc.ts';

/** Cup identifiers accepted by the calculator: the one list, `CUP_ID_VALUES` in lib/shared/calc.ts. */
export const CUP_IDS = CUP_ID_VALUES;
export type { CupId };

/** The cup families (series); the neighbour suggestion stays inside a family. */
export type CupFamily = 'zahn' | 'shell' | 'ford' | 'iso' | 'din';

/**
 * Conversion equation: 'linear' ν = k·(t − c); 'a-b/t' ν = A·t − B/t (ν mm²/s, t s).
 */
export type CupEquation = { kind: 'linear'; k: number; c: number } | { kind: 'a-b/t'; a: number; b: number };

/** A cup's conversion, valid window and provenance. */
export interface CupSpec {
  id: CupId;
  family: CupFamily;
  equation: CupEquation;
  /** Efflux-time window in seconds, inclusive at both ends. */
  validSeconds: { min: number; max: number };
  /** The published source the equation belongs to. */
  source: string;
  /** 'published' or 'from memory' (see the module note). */
  provenance: 'published' | 'from memory';
}

const D4212 = 'ASTM D4212 (dip-type viscosity cups), cup equation table';
const D1200 = 'ASTM D1200 (Ford viscosity cup); efflux window per D1200 §11.2';
const ISO2431 = 'ISO 2431 (flow cups), ν = A·t − B/t';
const DIN53211 = 'DIN 53211 (4 mm DIN cup; withdrawn, superseded by DIN EN ISO 2431)';

const lin = (k: number, c: number): CupEquation => ({ kind: 'linear', k, c });
const ab = (a: number, b: number): CupEquation => ({ kind: 'a-b/t', a, b });

/**
 * The cup table, ordered within each family from the smallest orifice (thinnest liquids) to the
 * largest.
 *
 * | cup | equation (ν mm²/s, t s) | window s | provenance |
 * |---|---|---|---|
 * | zahn-1 | 1.1(t − 29) | 35–80 | published, ASTM D4212 |
 * | zahn-2 | 3.5(t − 14) | 20–80 | published, ASTM D4212 |
 * | zahn-3 | 11.7(t − 7.5) | 20–80 | published, ASTM D4212 |
 * | zahn-4 | 14.8(t − 5) | 20–80 | published, ASTM D4212 |
 * | zahn-5 | 23t | 20–80 | published, ASTM D4212 |
 * | shell-1 | 0.226(t − 13) | 20–80 | published, ASTM D4212 |
 * | shell-2 | 0.576(t − 5) | 20–80 | published, ASTM D4212 |
 * | shell-2.5 | 0.925(t − 3) | 20–80 | published, ASTM D4212 |
 * | shell-3 | 1.51(t − 2) | 20–80 | published, ASTM D4212 |
 * | shell-3.5 | 2.17(t − 1.5) | 20–80 | published, ASTM D4212 |
 * | shell-4 | 3.45(t − 1) | 20–80 | published, ASTM D4212 |
 * | shell-5 | 6.5(t − 1) | 20–80 | published, ASTM D4212 |
 * | shell-6 | 16.2(t − 0.5) | 20–80 | published, ASTM D4212 |
 * | ford-1 | 0.49(t − 35) | 55–100 | published, ASTM D1200 |
 * | ford-2 | 1.44(t − 18) | 40–100 | published, ASTM D1200 |
 * | ford-3 | 2.31(t − 6.58) | 20–100 | window published (D1200 §11.2); equation confirmed by certified standards’ drain times (cited below) |
 * | ford-4 | 3.85(t − 4.49) | 20–100 | window published (D1200 §11.2); equation confirmed by certified standards’ drain times (cited below) |
 * | ford-5 | 12.1(t − 2.0) | 20–100 | window published (D1200 §11.2); equation confirmed by certified standards’ drain times (cited below) |
 * | iso-3mm | 0.443t − 200/t | 30–100 | from memory |
 * | iso-4mm | 1.37t − 200/t | 30–100 | from memory |
 * | iso-5mm | 3.28t − 220/t | 30–100 | from memory |
 * | iso-6mm | 6.90t − 570/t | 30–100 | from memory |
 * | din-4mm | 4.57t − 452/t | 25–150 | from memory |
 */
// prettier-ignore
export const CUPS: readonly CupSpec[] = [
  { id: 'zahn-1', family: 'zahn', equation: lin(1.1, 29), validSeconds: { min: 35, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'zahn-2', family: 'zahn', equation: lin(3.5, 14), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'zahn-3', family: 'zahn', equation: lin(11.7, 7.5), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'zahn-4', family: 'zahn', equation: lin(14.8, 5), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'zahn-5', family: 'zahn', equation: lin(23, 0), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-1', family: 'shell', equation: lin(0.226, 13), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-2', family: 'shell', equation: lin(0.576, 5), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-2.5', family: 'shell', equation: lin(0.925, 3), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-3', family: 'shell', equation: lin(1.51, 2), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-3.5', family: 'shell', equation: lin(2.17, 1.5), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-4', family: 'shell', equation: lin(3.45, 1), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-5', family: 'shell', equation: lin(6.5, 1), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'shell-6', family: 'shell', equation: lin(16.2, 0.5), validSeconds: { min: 20, max: 80 }, source: D4212, provenance: 'published' },
  { id: 'ford-1', family: 'ford', equation: lin(0.49, 35), validSeconds: { min: 55, max: 100 }, source: D1200, provenance: 'published' },
  { id: 'ford-2', family: 'ford', equation: lin(1.44, 18), validSeconds: { min: 40, max: 100 }, source: D1200, provenance: 'published' },
  { id: 'ford-3', family: 'ford', equation: lin(2.31, 6.58), validSeconds: { min: 20, max: 100 }, source: D1200, provenance: 'published' },
  { id: 'ford-4', family: 'ford', equation: lin(3.85, 4.49), validSeconds: { min: 20, max: 100 }, source: D1200, provenance: 'published' },
  { id: 'ford-5', family: 'ford', equation: lin(12.1, 2.0), validSeconds: { min: 20, max: 100 }, source: D1200, provenance: 'published' },
  { id: 'iso-3mm', family: 'iso', equation: ab(0.443, 200), validSeconds: { min: 30, max: 100 }, source: ISO2431, provenance: 'from memory' },
  { id: 'iso-4mm', family: 'iso', equation: ab(1.37, 200), validSeconds: { min: 30, max: 100 }, source: ISO2431, provenance: 'from memory' },
  { id: 'iso-5mm', family: 'iso', equation: ab(3.28, 220), validSeconds: { min: 30, max: 100 }, source: ISO2431, provenance: 'from memory' },
  { id: 'iso-6mm', family: 'iso', equation: ab(6.9, 570), validSeconds: { min: 30, max: 100 }, source: ISO2431, provenance: 'from memory' },
  { id: 'din-4mm', family: 'din', equation: ab(4.57, 452), validSeconds: { min: 25, max: 150 }, source: DIN53211, provenance: 'from memory' },
];

/** Inputs of `POST /api/v1/calc/viscosity-cup`. */
export interface ViscosityCupInput {
  cup: CupId;
  /** Efflux time, s. */
  seconds: number;
  /** Density of the liquid, g/cm³ (optional; gives the dynamic viscosity). */
  densityGCm3?: number | undefined;
  /**
   * The lab's own constants for this cup (from the cup's calibration certificate), replacing the
   * table's equation; the valid window stays the cup's. Optional.
   */
  equation?: CupEquation | undefined;
}

/** Result of a cup reading. */
export interface ViscosityCupResult {
  /** True when the efflux time is inside the cup's window. */
  inRange: boolean;
  /** ν in mm²/s (= cSt); absent when out of range. */
  kinematicMm2S?: number;
  /** η = ν × ρ in mPa·s (= cP); only in range and when density was given. */
  dynamicMPaS?: number;
  /** The cup's valid efflux window, s. */
  validSeconds: { min: number; max: number };
  cup: CupId;
  /** The published standard the conversion belongs to. */
  source: string;
  /** 'lab' when the request carried the lab's own constants. */
  provenance: 'published' | 'from memory' | 'lab';
  /** When out of range: "out of range — use another cup" with the neighbouring cup. */
  message?: string;
  /** The neighbouring cup in the same series to try, when there is one. */
  suggestedCup?: CupId;
}

/** Looks a cup up by id. @throws RangeError on an unknown id. */
export function cupSpec(id: CupId): CupSpec {
  const spec = CUPS.find((c) => c.id === id);
  if (!spec) throw new RangeError(`unknown cup ${String(id)}`);
  return spec;
}

/**
 * Evaluates a cup equation without any window check: ν = k(t − c) or ν = A·t − B/t (mm²/s).
 * Exposed for charts of a cup's line; use {@link viscosityFromCup} for readings.
 */
export function evaluateCupEquation(equation: CupEquation, seconds: number): number {
  return equation.kind === 'linear' ? equation.k * (seconds - equation.c) : equation.a * seconds - equation.b / seconds;
}

/**
 * Efflux seconds → kinematic viscosity (and dynamic viscosity when the density is given), the
 * `POST /api/v1/calc/viscosity-cup` calculation.
 *
 * ν (mm²/s) from the cup's equation (see {@link CUPS}); η (mPa·s) = ν (mm²/s) × ρ (g/cm³).
 * Inside the window (inclusive ends) → `inRange: true` with ν. Outside → `inRange: false`,
 * no viscosity, and "out of range — use another cup": a shorter time than the window means the
 * liquid is too thin for the cup (try the next smaller orifice in the series), a longer time
 * means too thick (try the next larger).
 * Sources: ASTM D4212, ASTM D1200, ISO 2431, DIN 53211 (per-cup provenance in {@link CUPS}).
 * @throws RangeError on a non-finite/non-positive time or density.
 */
export function viscosityFromCup(input: ViscosityCupInput): ViscosityCupResult {
  const spec = cupSpec(input.cup);
  const { seconds, densityGCm3 } = input;
  if (!Number.isFinite(seconds) || seconds <= 0) {
    throw new RangeError(`seconds must be a finite number greater than 0 (got ${seconds})`);
  }
  if (densityGCm3 !== undefined && (!Number.isFinite(densityGCm3) || densityGCm3 <= 0)) {
    throw new RangeError(`densityGCm3 must be a finite number greater than 0 (got ${densityGCm3})`);
  }
  const own = input.equation;
  if (own) {
    const ok =
      own.kind === 'linear'
        ? [own.k, own.c].every(Number.isFinite) && own.k > 0
        : [own.a, own.b].every(Number.isFinite) && own.a > 0;
    if (!ok) throw new RangeError('the cup constants must be finite, with a positive slope');
  }
  const base: Pick<ViscosityCupResult, 'validSeconds' | 'cup' | 'source' | 'provenance'> = {
    validSeconds: { ...spec.validSeconds },
    cup: spec.id,
    source: own ? `the lab’s constants for this cup (in place of ${spec.source})` : spec.source,
    provenance: own ? 'lab' : spec.provenance,
  };
  const { min, max } = spec.validSeconds;
  if (seconds < min || seconds > max) {
    const family = CUPS.filter((c) => c.family === spec.family);
    const at = family.findIndex((c) => c.id === spec.id);
    const tooThin = seconds < min;
    const neighbour = family[tooThin ? at - 1 : at + 1];
    const direction = tooThin
      ? `efflux shorter than ${min} s: the liquid is too thin for this cup`
      : `efflux longer than ${max} s: the liquid is too thick for this cup`;
    const advice = neighbour
      ? `try ${neighbour.id}`
      : `there is no ${tooThin ? 'smaller' : 'larger'} cup in this series — use another cup series or a viscometer`;
    const result: ViscosityCupResult = {
      inRange: false,
      ...base,
      message: `out of range — use another cup (${direction}; ${advice})`,
    };
    if (neighbour) result.suggestedCup = neighbour.id;
    return result;
  }
  const kinematicMm2S = evaluateCupEquation(own ?? spec.equation, seconds);
  const result: ViscosityCupResult = { inRange: true, kinematicMm2S, ...base };
  if (densityGCm3 !== undefined) result.dynamicMPaS = kinematicMm2S * densityGCm3;
  return result;
}
