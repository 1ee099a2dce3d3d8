/**
 * Dew point from air temperature and relative humidity, and the risk of blush (moisture
 * condensing into a wet lacquer film) on a surface near it.
 *
 * Magnus form over water with the coefficients of O. A. Alduchov & R. E. Eskridge, "Improved
 * Magnus form approximation of saturation vapor pressure", J. Appl. Meteor. 35 (1996) 601–609
 * (A = 17.625, B = 243.04 °C, C = 6.1094 hPa; stated for −40 to +50 °C):
 *   e_s(T) = C·exp(A·T/(B + T)),  γ = ln(RH/100) + A·T/(B + T),  T_d = B·γ/(A − γ).
 */

/** Alduchov & Eskridge (1996) Magnus coefficients over water. */
export const MAGNUS = { a: 17.625, bC: 243.04, cHpa: 6.1094 } as const;

/** Saturation vapour pressure over water, hPa (Magnus, Alduchov & Eskridge 1996). */
export function saturationVapourPressureHpa(tempC: number): number {
  return MAGNUS.cHpa * Math.exp((MAGNUS.a * tempC) / (MAGNUS.bC + tempC));
}

/** Dew point, °C, from air temperature (°C) and relative humidity (%, 0 < RH ≤ 100). */
export function dewPointC(tempC: number, rhPct: number): number {
  if (!(rhPct > 0 && rhPct <= 100)) throw new RangeError('relative humidity must be above 0 and at most 100 %');
  if (!(tempC >= -40 && tempC <= 50)) throw new RangeError('the Magnus coefficients hold from −40 to +50 °C');
  const g = Math.log(rhPct / 100) + (MAGNUS.a * tempC) / (MAGNUS.bC + tempC);
  return (MAGNUS.bC * g) / (MAGNUS.a - g);
}

export type BlushRisk = 'condensing' | 'at-risk' | 'clear';

export interface BlushAssessment {
  dewPointC: number;
  /** surface − dew point, °C */
  marginC: number;
  risk: BlushRisk;
  message: string;
}

/**
 * Blush risk of a surface (a bath, a lens) at `surfaceC` in room air at `airC`/`rhPct`: at or
 * below the dew point water condenses; within `marginC` above it (default 3 °C, the common
 * practice for coating work, cf. ISO 8502-4) the risk is high.
 */
export function blushRisk(airC: number, rhPct: number, surfaceC: number, marginC = 3): BlushAssessment {
  if (!(marginC >= 0)) throw new RangeError('the margin must be 0 °C or more');
  const td = dewPointC(airC, rhPct);
  const m = surfaceC - td;
  const risk: BlushRisk = m <= 0 ? 'condensing' : m <= marginC ? 'at-risk' : 'clear';
  const message =
    risk === 'condensing'
      ? `The surface (${surfaceC.toFixed(1)} °C) is at or below the dew point (${td.toFixed(1)} °C): water condenses; expect blush.`
      : risk === 'at-risk'
        ? `The surface is only ${m.toFixed(1)} °C above the dew point (${td.toFixed(1)} °C), inside the ${marginC} °C margin: blush risk.`
        : `The surface is ${m.toFixed(1)} °C above the dew point (${td.toFixed(1)} °C).`;
  return { dewPointC: td, marginC: m, risk, message };
}
