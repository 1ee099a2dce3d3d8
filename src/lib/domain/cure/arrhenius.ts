/**
 * Arrhenius equivalent time at a reference temperature, time at or above a temperature, and
 * the activation energy that makes two cure schedules equivalent.
 *
 * The mathematics is the equivalent-age maturity function of ASTM C1074 (Standard Practice for
 * Estimating Concrete Strength by the Maturity Method): t_e = Σ exp(−Q·(1/T_a − 1/T_s))·Δt with
 * Q = E/R, T_a the average temperature over the interval Δt and T_s the reference (specified)
 * temperature, both in kelvin. Applied to lacquer cure it is an estimate: the activation energy
 * comes from the lacquer maker's data or the lab's own validation.
 */

/** Molar gas constant R = 8.314462618 J/(mol·K) (CODATA 2018, exact since the 2019 SI). */
export const GAS_CONSTANT_J_MOL_K = 8.314462618;

/** 0 °C in kelvin. */
export const ZERO_CELSIUS_K = 273.15;

/** One point of a temperature profile: elapsed minutes and temperature in °C. */
export interface ProfilePoint {
  minutes: number;
  tempC: number;
}

/** Arrhenius parameters: activation energy (kJ/mol) and reference temperature (°C). */
export interface ArrheniusParams {
  activationEnergyKJMol: number;
  referenceC: number;
}

function checkParams({ activationEnergyKJMol, referenceC }: ArrheniusParams): void {
  if (!Number.isFinite(activationEnergyKJMol) || activationEnergyKJMol < 0) {
    throw new RangeError('activationEnergyKJMol must be a finite number ≥ 0');
  }
  if (!Number.isFinite(referenceC) || referenceC <= -ZERO_CELSIUS_K) {
    throw new RangeError('referenceC must be above absolute zero');
  }
}

/**
 * Checks a profile: at least 2 points, finite values, minutes non-decreasing, temperatures
 * above absolute zero. @throws RangeError otherwise.
 */
export function checkProfile(profile: readonly ProfilePoint[]): void {
  if (profile.length < 2) throw new RangeError('a profile needs at least 2 points');
  profile.forEach((p, i) => {
    if (!Number.isFinite(p.minutes) || !Number.isFinite(p.tempC) || p.tempC <= -ZERO_CELSIUS_K) {
      throw new RangeError(`profile point ${i} is not a finite time/temperature above absolute zero`);
    }
    const prev = profile[i - 1];
    if (prev && p.minutes < prev.minutes) {
      throw new RangeError(`profile minutes must not decrease (point ${i})`);
    }
  });
}

/**
 * Arrhenius (age-conversion) factor exp(−(Ea/R)·(1/T − 1/T_ref)), T and T_ref in kelvin from
 * °C. Dimensionless; 1 at the reference temperature, > 1 above it.
 * Source: ASTM C1074 equivalent-age function (Q = Ea/R); R CODATA.
 */
export function arrheniusFactor(tempC: number, params: ArrheniusParams): number {
  checkParams(params);
  const q = (params.activationEnergyKJMol * 1000) / GAS_CONSTANT_J_MOL_K;
  return Math.exp(-q * (1 / (tempC + ZERO_CELSIUS_K) - 1 / (params.referenceC + ZERO_CELSIUS_K)));
}

/**
 * Equivalent minutes at the reference temperature:
 * t_eq = Σ Δt_i·exp(−(Ea/R)·(1/T̄_i − 1/T_ref)), T̄_i = mean of the interval's two endpoint
 * temperatures (in K), Δt in minutes, Ea in J/mol (input kJ/mol), R = 8.314462618 J/(mol·K).
 * Source: ASTM C1074 equivalent age (the average temperature over each interval).
 *
 * With a datum temperature (the idea of the maturity method's datum temperature T₀ below which
 * no curing is counted, ASTM C1074 §3 / the Nurse–Saul function), nothing accrues below the
 * datum: an interval wholly below counts 0; one that crosses it counts only its part at or above
 * the datum (linear interpolation of the crossing), at the mean of the datum and its upper end.
 * The cure record passes the window's minimum cure temperature as the datum: a lacquer's
 * minimum temperature (deblocking, Tg) is a requirement Arrhenius cannot trade away.
 * @param include optional filter: only intervals for which it returns true are counted (the
 *   cure record uses it to leave data gaps out).
 * @param datumC optional datum temperature, °C (none: every interval counts).
 */
export function equivalentMinutes(
  profile: readonly ProfilePoint[],
  params: ArrheniusParams,
  include?: (index: number, a: ProfilePoint, b: ProfilePoint) => boolean,
  datumC?: number,
): number {
  checkProfile(profile);
  checkParams(params);
  if (datumC !== undefined && !Number.isFinite(datumC)) throw new RangeError('datumC must be finite');
  let sum = 0;
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1] as ProfilePoint;
    const b = profile[i] as ProfilePoint;
    if (include && !include(i - 1, a, b)) continue;
    const dt = b.minutes - a.minutes;
    if (dt === 0) continue;
    if (datumC === undefined || (a.tempC >= datumC && b.tempC >= datumC)) {
      sum += dt * arrheniusFactor((a.tempC + b.tempC) / 2, params);
      continue;
    }
    const hi = Math.max(a.tempC, b.tempC);
    const lo = Math.min(a.tempC, b.tempC);
    if (hi <= datumC) continue;
    const above = ((hi - datumC) / (hi - lo)) * dt;
    sum += above * arrheniusFactor((datumC + hi) / 2, params);
  }
  return sum;
}

/**
 * Minutes at or above a threshold temperature, with LINEAR INTERPOLATION of the crossing
 * inside an interval (the profile is taken as piecewise linear between points): an interval
 * wholly at/above counts fully; one that crosses counts the fraction of Δt above the
 * threshold, (T_hi − threshold)/(T_hi − T_lo)·Δt for a one-sided crossing. Chosen over
 * "interval mean ≥ threshold" because it does not jump by a whole interval when one reading
 * moves by a tenth of a degree. Units: minutes, °C. Source: hand-computable geometry.
 * @param include optional interval filter, as in {@link equivalentMinutes}.
 */
export function minutesAtOrAbove(
  profile: readonly ProfilePoint[],
  thresholdC: number,
  include?: (index: number, a: ProfilePoint, b: ProfilePoint) => boolean,
): number {
  checkProfile(profile);
  if (!Number.isFinite(thresholdC)) throw new RangeError('thresholdC must be finite');
  let sum = 0;
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1] as ProfilePoint;
    const b = profile[i] as ProfilePoint;
    if (include && !include(i - 1, a, b)) continue;
    const dt = b.minutes - a.minutes;
    if (dt === 0) continue;
    const aUp = a.tempC >= thresholdC;
    const bUp = b.tempC >= thresholdC;
    if (aUp && bUp) sum += dt;
    else if (aUp || bUp) {
      const hi = Math.max(a.tempC, b.tempC);
      const lo = Math.min(a.tempC, b.tempC);
      sum += ((hi - thresholdC) / (hi - lo)) * dt;
    }
  }
  return sum;
}

/** Inputs of `POST /api/v1/calc/cure-equivalent`. */
export interface CureEquivalentInput extends ArrheniusParams {
  profile: ProfilePoint[];
  /** Optional threshold for time at or above, °C. */
  thresholdC?: number | undefined;
}

/** Output of `POST /api/v1/calc/cure-equivalent`. */
export interface CureEquivalentResult {
  /** Equivalent minutes at the reference temperature. */
  equivalentMinutes: number;
  /** Minutes at or above thresholdC (interpolated crossings), when a threshold was given. */
  minutesAtOrAbove?: number;
}

/**
 * The `POST /api/v1/calc/cure-equivalent` calculation: {@link equivalentMinutes} (ASTM C1074
 * equivalent-age form, interval mean temperature) and, with a threshold,
 * {@link minutesAtOrAbove}.
 */
export function cureEquivalent(input: CureEquivalentInput): CureEquivalentResult {
  const result: CureEquivalentResult = {
    equivalentMinutes: equivalentMinutes(input.profile, input),
  };
  if (input.thresholdC !== undefined) {
    result.minutesAtOrAbove = minutesAtOrAbove(input.profile, input.thresholdC);
  }
  return result;
}

/** An isothermal schedule: minutes at a temperature. */
export interface IsothermalSchedule {
  minutes: number;
  tempC: number;
}

/** A solved activation energy, or the reason there is none. */
export type ActivationEnergySolution = { ok: true; activationEnergyKJMol: number } | { ok: false; reason: string };

/**
 * Activation energy that makes two isothermal schedules give the same Arrhenius equivalent
 * time: t_A·exp(−Ea/(R·T_A)) = t_B·exp(−Ea/(R·T_B)) ⇒ Ea = R·ln(t_A/t_B)/(1/T_A − 1/T_B)
 * (equivalently R·ln(t_B/t_A)/(1/T_B − 1/T_A)), T in K, result in kJ/mol.
 * A physical (positive) Ea needs the hotter schedule to be the shorter one.
 * Example (computed): 60 min at 120 °C ≡ 120 min at 110 °C ("rate doubles per 10 °C")
 * ⇒ Ea ≈ 86.8 kJ/mol. Source: Arrhenius law; same form as ASTM C1074 Q = E/R.
 */
export function activationEnergyForEquivalence(a: IsothermalSchedule, b: IsothermalSchedule): ActivationEnergySolution {
  for (const s of [a, b]) {
    if (!Number.isFinite(s.minutes) || s.minutes <= 0 || !Number.isFinite(s.tempC) || s.tempC <= -ZERO_CELSIUS_K) {
      return { ok: false, reason: 'each schedule needs minutes > 0 and a temperature above absolute zero' };
    }
  }
  const ta = a.tempC + ZERO_CELSIUS_K;
  const tb = b.tempC + ZERO_CELSIUS_K;
  if (ta === tb) {
    return {
      ok: false,
      reason:
        a.minutes === b.minutes
          ? 'the schedules are identical: any activation energy makes them equivalent'
          : 'same temperature, different times: no activation energy makes them equivalent',
    };
  }
  const ea = (GAS_CONSTANT_J_MOL_K * Math.log(a.minutes / b.minutes)) / (1 / ta - 1 / tb);
  if (!(ea > 0)) {
    return {
      ok: false,
      reason: 'the hotter schedule must be the shorter one for a positive activation energy',
    };
  }
  return { ok: true, activationEnergyKJMol: ea / 1000 };
}

function logEquivalent(profile: readonly ProfilePoint[], eaJ: number): number {
  // ln Σ Δt·exp(−(Ea/R)/T̄) by log-sum-exp (reference temperature cancels in the comparison).
  const terms: number[] = [];
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1] as ProfilePoint;
    const b = profile[i] as ProfilePoint;
    const dt = b.minutes - a.minutes;
    if (dt <= 0) continue;
    const t = (a.tempC + b.tempC) / 2 + ZERO_CELSIUS_K;
    terms.push(Math.log(dt) - eaJ / (GAS_CONSTANT_J_MOL_K * t));
  }
  if (terms.length === 0) return -Infinity;
  const m = Math.max(...terms);
  return m + Math.log(terms.reduce((s, x) => s + Math.exp(x - m), 0));
}

/**
 * General solver: the activation energy (kJ/mol) at which two temperature profiles give equal
 * Arrhenius equivalent time, by bisection on f(Ea) = ln t_eq,A(Ea) − ln t_eq,B(Ea) over
 * [loKJMol, hiKJMol] (default 1–400 kJ/mol), tolerance 1e-6 kJ/mol. Interval mean temperature
 * as in {@link equivalentMinutes}. Refuses when f has no sign change in the bracket.
 */
export function activationEnergyForProfiles(
  a: readonly ProfilePoint[],
  b: readonly ProfilePoint[],
  bracket: { loKJMol?: number; hiKJMol?: number } = {},
): ActivationEnergySolution {
  checkProfile(a);
  checkProfile(b);
  let lo = bracket.loKJMol ?? 1;
  let hi = bracket.hiKJMol ?? 400;
  if (!(lo > 0 && hi > lo)) return { ok: false, reason: 'the bracket must satisfy 0 < lo < hi' };
  const f = (eaKJ: number): number => logEquivalent(a, eaKJ * 1000) - logEquivalent(b, eaKJ * 1000);
  let flo = f(lo);
  const fhi = f(hi);
  if (flo === 0) return { ok: true, activationEnergyKJMol: lo };
  if (fhi === 0) return { ok: true, activationEnergyKJMol: hi };
  if (!Number.isFinite(flo) || !Number.isFinite(fhi) || Math.sign(flo) === Math.sign(fhi)) {
    return {
      ok: false,
      reason: `no activation energy between ${lo} and ${hi} kJ/mol makes the two profiles equivalent`,
    };
  }
  for (let iter = 0; iter < 200 && hi - lo > 1e-6; iter++) {
    const mid = (lo + hi) / 2;
    const fm = f(mid);
    if (fm === 0) return { ok: true, activationEnergyKJMol: mid };
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return { ok: true, activationEnergyKJMol: (lo + hi) / 2 };
}
