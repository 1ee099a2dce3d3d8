/**
 * Dew point and blush risk: against a second saturation-pressure formula (A. L. Buck, J. Appl.
 * Meteor. 20 (1981) 1527–1532, the "enhanced" 1996 form e_s = 6.1121·exp((18.678 − T/234.5)·T/(257.14 + T));
 * coefficients from memory), inverted numerically; and the properties that must hold.
 */
import { describe, expect, it } from 'vitest';
import { blushRisk, dewPointC, saturationVapourPressureHpa } from '../../../src/lib/domain/room/dew-point.ts';

const buck = (t: number) => 6.1121 * Math.exp((18.678 - t / 234.5) * (t / (257.14 + t)));
/** Dew point by bisection on Buck's e_s: e_s(Td) = RH·e_s(T). */
function buckDewPoint(t: number, rh: number): number {
  const target = (rh / 100) * buck(t);
  let lo = -60;
  let hi = t;
  for (let i = 0; i < 100; i += 1) {
    const mid = (lo + hi) / 2;
    if (buck(mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('dew point (Magnus, Alduchov & Eskridge 1996)', () => {
  it('agrees with Buck’s formula inverted numerically within 0.1 °C over 0–40 °C and 20–95 % RH', () => {
    for (const t of [0, 10, 18, 22, 30, 40])
      for (const rh of [20, 40, 60, 80, 95]) expect(Math.abs(dewPointC(t, rh) - buckDewPoint(t, rh))).toBeLessThan(0.1);
  });
  it('e_s within 0.3 % of Buck from 0 to 40 °C (the two fits differ by about that much)', () => {
    for (const t of [0, 10, 20, 30, 40]) expect(Math.abs(saturationVapourPressureHpa(t) / buck(t) - 1)).toBeLessThan(0.003);
  });
  it('at 100 % RH the dew point is the air temperature; it rises with RH and with temperature', () => {
    expect(dewPointC(21.3, 100)).toBeCloseTo(21.3, 10);
    expect(dewPointC(21, 61)).toBeGreaterThan(dewPointC(21, 60));
    expect(dewPointC(22, 60)).toBeGreaterThan(dewPointC(21, 60));
  });
  it('refuses RH outside (0, 100] and temperatures outside −40…50 °C', () => {
    expect(() => dewPointC(20, 0)).toThrow(RangeError);
    expect(() => dewPointC(20, 101)).toThrow(RangeError);
    expect(() => dewPointC(60, 50)).toThrow(RangeError);
  });
});

describe('blush risk', () => {
  const td = dewPointC(24, 70);
  it('condensing at or below the dew point, at risk within the margin, clear beyond it', () => {
    expect(blushRisk(24, 70, td - 0.5).risk).toBe('condensing');
    expect(blushRisk(24, 70, td + 2.9).risk).toBe('at-risk');
    expect(blushRisk(24, 70, td + 3.1).risk).toBe('clear');
    expect(blushRisk(24, 70, td + 3.1, 5).risk).toBe('at-risk');
  });
});
