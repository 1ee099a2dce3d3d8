/**
 * Independent checks of the cure maths and verdict: the review's counter-example (W2), the
 * datum-temperature rule against numerical integration of the piecewise-linear profile (a second
 * method), and properties (fast-check) that must hold for any profile.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { arrheniusFactor, equivalentMinutes, minutesAtOrAbove } from '../../../src/lib/domain/cure/arrhenius.ts';
import { cureRecord, type CureWindow, type OvenReading } from '../../../src/lib/domain/cure/cure-record.ts';

const MIN = 60_000;
const T0 = Date.UTC(2026, 0, 5, 6, 0, 0);

/** Review W2 window: minimum 110 °C, 60 equivalent minutes at 120 °C, Ea 80 kJ/mol. */
const W: CureWindow = {
  minTempC: 110,
  minEquivalentMinutes: 60,
  referenceC: 120,
  activationEnergyKJMol: 80,
  maxPartTempC: 130,
  maxRampCPerMin: 5,
  maxGapSeconds: 120,
};

function piecewise(corners: readonly [number, number][], everySeconds = 30, t0 = T0): OvenReading[] {
  const out: OvenReading[] = [];
  const end = corners[corners.length - 1]![0];
  for (let s = 0; s <= end * 60; s += everySeconds) {
    const m = s / 60;
    let k = 0;
    while (k < corners.length - 2 && corners[k + 1]![0] < m) k++;
    const [m0, a] = corners[k]!;
    const [m1, b] = corners[k + 1]!;
    out.push({ tMs: t0 + s * 1000, tempC: a + ((b - a) * (m - m0)) / (m1 - m0) });
  }
  return out;
}

describe('cure verdict honours the minimum cure temperature (review W2)', () => {
  it('ramp to 108 °C, hold 150 min, cool (review counter-example): under-cured, 0 equivalent minutes, 0 min at or above', () => {
    const r = cureRecord({
      readings: piecewise([
        [0, 25],
        [30, 108],
        [180, 108],
        [210, 40],
      ]),
      window: W,
    });
    expect(r.verdict).toBe('under-cured');
    expect(r.equivalentMinutes).toBe(0);
    expect(r.minutesAtOrAboveMin).toBe(0);
    expect(r.reasons[0]).toMatch(/never reached the minimum 110 °C/);
  });
  it('without the datum the same profile counts more than the 60 needed (review: 72.3 on its profile), which is why the old verdict said complete', () => {
    const prof = piecewise([
      [0, 25],
      [30, 108],
      [180, 108],
      [210, 40],
    ]).map((x) => ({
      minutes: (x.tMs - T0) / MIN,
      tempC: x.tempC as number,
    }));
    expect(equivalentMinutes(prof, W)).toBeGreaterThan(60);
    expect(equivalentMinutes(prof, W, undefined, W.minTempC)).toBe(0);
  });
  it('a soak shorter than the window’s soak minutes is under-cured even when the equivalent minutes suffice', () => {
    // 30 min at 128 °C gives 30·f(128) ≈ 51 … plus ramps; the recipe also asks 45 min at ≥ 110 °C.
    const readings = piecewise([
      [0, 25],
      [20, 128],
      [60, 128],
      [70, 100],
    ]);
    const loose = cureRecord({ readings, window: { ...W, minEquivalentMinutes: 40 } });
    expect(loose.verdict).toBe('complete');
    const strict = cureRecord({ readings, window: { ...W, minEquivalentMinutes: 40, minSoakMinutes: 60 } });
    expect(strict.verdict).toBe('under-cured');
    expect(strict.reasons.join(' ')).toMatch(/at or above 110 °C; the recipe needs 60/);
  });
});

/** Second method: composite Simpson integration of f(T(t))·[T(t) ≥ datum] over a piecewise-linear profile. */
function simpsonEquivalent(corners: readonly [number, number][], datumC: number, steps = 200_000): number {
  const end = corners[corners.length - 1]![0];
  const temp = (m: number): number => {
    let k = 0;
    while (k < corners.length - 2 && corners[k + 1]![0] < m) k++;
    const [m0, a] = corners[k]!;
    const [m1, b] = corners[k + 1]!;
    return a + ((b - a) * (m - m0)) / (m1 - m0);
  };
  const g = (m: number): number => {
    const t = temp(m);
    return t >= datumC ? arrheniusFactor(t, W) : 0;
  };
  const h = end / steps;
  let s = g(0) + g(end);
  for (let i = 1; i < steps; i++) s += (i % 2 === 1 ? 4 : 2) * g(i * h);
  return (s * h) / 3;
}

describe('equivalent minutes with a datum: interval-mean sum against numerical integration', () => {
  const corners: [number, number][] = [
    [0, 25],
    [40, 122],
    [100, 122],
    [140, 40],
  ];
  it('1-second readings: the C1074 interval-mean sum agrees with Simpson integration of the Arrhenius rate to 1e-6 relative', () => {
    const prof = piecewise(corners, 1).map((x) => ({ minutes: (x.tMs - T0) / MIN, tempC: x.tempC as number }));
    const sum = equivalentMinutes(prof, W, undefined, W.minTempC);
    const integral = simpsonEquivalent(corners, W.minTempC);
    expect(Math.abs(sum / integral - 1)).toBeLessThan(1e-6);
  });
  it('30-second readings: within 1e-4 (the interval mean is a second-order rule)', () => {
    const prof = piecewise(corners, 30).map((x) => ({ minutes: (x.tMs - T0) / MIN, tempC: x.tempC as number }));
    expect(Math.abs(equivalentMinutes(prof, W, undefined, W.minTempC) / simpsonEquivalent(corners, W.minTempC) - 1)).toBeLessThan(
      1e-4,
    );
  });
  it('time at or above 110 °C on that profile: crossings at 40·85/97 and 100 + 40·12/82 min (hand geometry)', () => {
    const prof = piecewise(corners, 30).map((x) => ({ minutes: (x.tMs - T0) / MIN, tempC: x.tempC as number }));
    expect(minutesAtOrAbove(prof, 110)).toBeCloseTo(100 + (40 * 12) / 82 - (40 * 85) / 97, 6);
  });
});

const profileArb = fc
  .array(fc.tuple(fc.integer({ min: 1, max: 20 }), fc.double({ min: 20, max: 129, noNaN: true })), {
    minLength: 2,
    maxLength: 40,
  })
  .map((steps) => {
    let m = 0;
    return steps.map(([dm, t]) => {
      m += dm;
      return { tMs: T0 + m * 30_000, tempC: t } as OvenReading;
    });
  });

describe('cure record properties (fast-check)', () => {
  it('invariant to a shift of the time axis (verdict, equivalent minutes, minutes at or above, peak)', () => {
    fc.assert(
      fc.property(profileArb, fc.integer({ min: -1e9, max: 1e9 }), (readings, shiftS) => {
        const a = cureRecord({ readings, window: W });
        const b = cureRecord({ readings: readings.map((r) => ({ ...r, tMs: r.tMs + shiftS * 1000 })), window: W });
        return (
          a.verdict === b.verdict &&
          Math.abs(a.equivalentMinutes - b.equivalentMinutes) <= 1e-9 * Math.max(1, a.equivalentMinutes) &&
          Math.abs(a.minutesAtOrAboveMin - b.minutesAtOrAboveMin) <= 1e-6 &&
          a.peakC === b.peakC
        );
      }),
    );
  });
  it('a load that stays below the minimum is never complete, and earns 0 equivalent minutes', () => {
    fc.assert(
      fc.property(profileArb, (readings) => {
        const below = readings.map((r) => ({ ...r, tempC: Math.min(r.tempC as number, W.minTempC - 0.01) }));
        const rec = cureRecord({ readings: below, window: W });
        return rec.verdict !== 'complete' && rec.equivalentMinutes === 0;
      }),
    );
  });
  it('heating the part (all readings +δ, staying under the maximum) never lowers the equivalent minutes', () => {
    fc.assert(
      fc.property(profileArb, fc.double({ min: 0, max: 10, noNaN: true }), (readings, d) => {
        const warmer = readings.map((r) => ({ ...r, tempC: (r.tempC as number) + d }));
        return (
          cureRecord({ readings: warmer, window: W }).equivalentMinutes >=
          cureRecord({ readings, window: W }).equivalentMinutes - 1e-9
        );
      }),
    );
  });
  it('complete implies: minimum reached, equivalent minutes ≥ the window’s, peak ≤ the maximum', () => {
    fc.assert(
      fc.property(profileArb, (readings) => {
        const r = cureRecord({ readings, window: { ...W, minEquivalentMinutes: 5 } });
        if (r.verdict !== 'complete') return true;
        return r.soak !== null && r.equivalentMinutes >= 5 && (r.peakC ?? Infinity) <= W.maxPartTempC;
      }),
    );
  });
});
