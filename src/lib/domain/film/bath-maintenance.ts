/**
 * Dip-bath maintenance: solvent or fresh-lacquer additions by solids mass balance, and bath
 * age against pot life.
 *
 * Additions follow the material's safety data sheet, ventilation and local fire codes (the
 * lacquer and its solvents are flammable and harmful); this module only does the arithmetic.
 */
import type { BathAddition, BathAdditionRefusal, BathAge } from '../../shared/baths.ts';

export type { BathAddition, BathAdditionRefusal, BathAge };

/** Inputs of the addition calculation. Solids are mass fractions in percent (wt %). */
export interface BathAdditionInput {
  /** Current bath mass, kg. */
  bathMassKg: number;
  /** Current solids content, wt % (0–100). */
  solidsNowPct: number;
  /** Target solids content, wt % (0–100). */
  solidsTargetPct: number;
  /** Solids content of the fresh lacquer, wt % (needed to raise solids). */
  lacquerSolidsPct?: number | undefined;
  /** Largest bath mass the tank holds, kg (optional; additions beyond it are refused). */
  maxBathMassKg?: number | undefined;
}

function pct(name: string, v: number): string | null {
  return Number.isFinite(v) && v >= 0 && v <= 100 ? null : `${name} must be between 0 and 100 wt %`;
}

/**
 * Solvent or fresh-lacquer addition that returns the bath's solids to target, by mass balance
 * of solids (solids mass is conserved; solvent carries none):
 * - solvent to lower solids: m_solvent = m_bath·(s_now/s_target − 1), needs s_now > s_target > 0;
 * - fresh lacquer to raise solids: m_add = m_bath·(s_target − s_now)/(s_lacquer − s_target),
 *   valid only when s_lacquer > s_target > s_now.
 * Units: kg, wt %. Source: steady mass balance (any chemical-engineering text, e.g. Himmelblau,
 * *Basic Principles and Calculations in Chemical Engineering*, ch. on material balances).
 * Impossible requests are refused with a reason, never thrown.
 */
export function bathAddition(input: BathAdditionInput): BathAddition | BathAdditionRefusal {
  const { bathMassKg, solidsNowPct: sNow, solidsTargetPct: sTarget, lacquerSolidsPct, maxBathMassKg } = input;
  if (!Number.isFinite(bathMassKg) || bathMassKg <= 0) {
    return { ok: false, reason: 'bath mass must be greater than 0 kg' };
  }
  const bad = pct('current solids', sNow) ?? pct('target solids', sTarget);
  if (bad) return { ok: false, reason: bad };
  let kind: BathAddition['kind'];
  let massKg: number;
  if (Math.abs(sNow - sTarget) < 1e-9) {
    kind = 'none';
    massKg = 0;
  } else if (sNow > sTarget) {
    if (sTarget <= 0) {
      return { ok: false, reason: 'solvent cannot bring solids down to 0 % — the target must be above 0' };
    }
    kind = 'solvent';
    massKg = bathMassKg * (sNow / sTarget - 1);
  } else {
    if (lacquerSolidsPct === undefined) {
      return { ok: false, reason: 'raising solids needs the fresh lacquer’s solids content' };
    }
    const badL = pct('lacquer solids', lacquerSolidsPct);
    if (badL) return { ok: false, reason: badL };
    if (!(lacquerSolidsPct > sTarget)) {
      return {
        ok: false,
        reason: `fresh lacquer at ${lacquerSolidsPct} % solids cannot raise the bath to ${sTarget} % — its solids must be above the target`,
      };
    }
    kind = 'lacquer';
    massKg = (bathMassKg * (sTarget - sNow)) / (lacquerSolidsPct - sTarget);
  }
  const resultingBathMassKg = bathMassKg + massKg;
  if (maxBathMassKg !== undefined && resultingBathMassKg > maxBathMassKg) {
    return {
      ok: false,
      reason: `the addition would take the bath to ${resultingBathMassKg.toFixed(1)} kg, above the tank’s ${maxBathMassKg} kg — drain part of the bath first`,
    };
  }
  return { ok: true, kind, massKg, resultingBathMassKg, resultingSolidsPct: sTarget };
}

/** Fraction of pot life at which a bath is flagged 'near-end': 0.8 (common practice). */
export const POT_LIFE_NEAR_END_FRACTION = 0.8;

/** Inputs of the bath-age helper. The caller supplies "now" (the domain reads no clock). */
export interface BathAgeInput {
  /** When the bath was charged, epoch ms. */
  chargedAtMs: number;
  /** The instant to evaluate at, epoch ms. */
  nowMs: number;
  /** Pot life from the lacquer maker's data sheet, days. */
  potLifeDays: number;
  /** Fraction of pot life that counts as near the end (default 0.8, common practice). */
  nearEndFraction?: number | undefined;
}

/**
 * Bath age and pot-life use: age = (now − charged)/86 400 000 ms·day⁻¹; fraction = age/pot life;
 * status 'expired' at fraction ≥ 1, 'near-end' at ≥ 0.8 (common practice), else 'ok'.
 * @throws RangeError when now precedes the charge or pot life is not positive.
 */
export function bathAge(input: BathAgeInput): BathAge {
  const { chargedAtMs, nowMs, potLifeDays } = input;
  const nearEnd = input.nearEndFraction ?? POT_LIFE_NEAR_END_FRACTION;
  if (!Number.isFinite(chargedAtMs) || !Number.isFinite(nowMs) || nowMs < chargedAtMs) {
    throw new RangeError('nowMs must be a finite time at or after chargedAtMs');
  }
  if (!Number.isFinite(potLifeDays) || potLifeDays <= 0) {
    throw new RangeError('potLifeDays must be greater than 0');
  }
  if (!Number.isFinite(nearEnd) || nearEnd <= 0 || nearEnd >= 1) {
    throw new RangeError('nearEndFraction must be in (0, 1)');
  }
  const ageDays = (nowMs - chargedAtMs) / 86_400_000;
  const potLifeFractionUsed = ageDays / potLifeDays;
  const status = potLifeFractionUsed >= 1 ? 'expired' : potLifeFractionUsed >= nearEnd ? 'near-end' : 'ok';
  return { ageDays, potLifeFractionUsed, status };
}
