/**
 * Properties that must hold for the smaller calculators whatever the input (fast-check), each
 * a check from outside the formula under test: the mass balance re-evaluated on the mixed bath,
 * the solved activation energy fed back through the equivalent-minutes sum, order and shift
 * invariance of the uniformity survey, monotone cross-cut bands.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { activationEnergyForEquivalence, equivalentMinutes } from '../../../src/lib/domain/cure/arrhenius.ts';
import { bathAddition } from '../../../src/lib/domain/film/bath-maintenance.ts';
import { AMS2750_CLASSES, uniformitySurvey } from '../../../src/lib/domain/oven/uniformity.ts';
import { crosscutClass } from '../../../src/lib/domain/quality/crosscut.ts';

describe('bath addition: mixing the advised mass gives the target (solids mass conserved)', () => {
  it('solvent: (m·s_now)/(m + m_solvent) = s_target', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 5000, noNaN: true }),
        fc.double({ min: 5, max: 60, noNaN: true }),
        fc.double({ min: 0.01, max: 0.99, noNaN: true }),
        (m, sNow, f) => {
          const sTarget = sNow * f;
          const r = bathAddition({ bathMassKg: m, solidsNowPct: sNow, solidsTargetPct: sTarget });
          if (!r.ok || r.kind !== 'solvent') return false;
          return (
            Math.abs((m * sNow) / (m + r.massKg) / sTarget - 1) < 1e-9 && Math.abs(r.resultingBathMassKg - (m + r.massKg)) < 1e-9
          );
        },
      ),
    );
  });
  it('fresh lacquer: (m·s_now + m_add·s_lacquer)/(m + m_add) = s_target', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 5000, noNaN: true }),
        fc.double({ min: 5, max: 30, noNaN: true }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        fc.double({ min: 0.5, max: 20, noNaN: true }),
        (m, sNow, up, over) => {
          const sTarget = sNow + up;
          const sLacquer = sTarget + over;
          const r = bathAddition({ bathMassKg: m, solidsNowPct: sNow, solidsTargetPct: sTarget, lacquerSolidsPct: sLacquer });
          if (!r.ok || r.kind !== 'lacquer') return false;
          return Math.abs((m * sNow + r.massKg * sLacquer) / (m + r.massKg) / sTarget - 1) < 1e-9;
        },
      ),
    );
  });
});

describe('activation energy from two schedules, fed back through the equivalent-minutes sum', () => {
  it('with the solved Ea both isothermal schedules give the same equivalent minutes at any reference', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 60, max: 160, noNaN: true }),
        fc.double({ min: 1, max: 40, noNaN: true }),
        fc.double({ min: 10, max: 300, noNaN: true }),
        fc.double({ min: 1.05, max: 8, noNaN: true }),
        fc.double({ min: 50, max: 200, noNaN: true }),
        (tB, dT, minutesA, ratio, referenceC) => {
          const a = { minutes: minutesA, tempC: tB + dT };
          const b = { minutes: minutesA * ratio, tempC: tB };
          const sol = activationEnergyForEquivalence(a, b);
          if (!sol.ok) return false;
          const params = { activationEnergyKJMol: sol.activationEnergyKJMol, referenceC };
          const iso = (s: { minutes: number; tempC: number }) => [
            { minutes: 0, tempC: s.tempC },
            { minutes: s.minutes, tempC: s.tempC },
          ];
          const ea = equivalentMinutes(iso(a), params);
          const eb = equivalentMinutes(iso(b), params);
          return Math.abs(ea / eb - 1) < 1e-9;
        },
      ),
    );
  });
  it('“rate doubles per 10 °C” near 115 °C is about 87 kJ/mol (references.md, computed)', () => {
    const sol = activationEnergyForEquivalence({ minutes: 60, tempC: 120 }, { minutes: 120, tempC: 110 });
    expect(sol.ok && sol.activationEnergyKJMol).toBeCloseTo(86.8, 1);
  });
});

describe('uniformity survey: invariances and the class definition', () => {
  const sensorsArb = fc.array(
    fc.record({
      name: fc.string({ minLength: 1, maxLength: 6 }),
      readingsC: fc.array(fc.double({ min: 80, max: 160, noNaN: true }), { minLength: 1, maxLength: 8 }),
    }),
    { minLength: 1, maxLength: 8 },
  );
  it('reordering the sensors changes nothing; shifting readings and setpoint together changes nothing', () => {
    fc.assert(
      fc.property(sensorsArb, fc.double({ min: -30, max: 30, noNaN: true }), (sensors, shift) => {
        const a = uniformitySurvey({ setpointC: 120, sensors });
        const b = uniformitySurvey({ setpointC: 120, sensors: [...sensors].reverse() });
        const c = uniformitySurvey({
          setpointC: 120 + shift,
          sensors: sensors.map((s) => ({ ...s, readingsC: s.readingsC.map((x) => x + shift) })),
        });
        return (
          a.hottestDeviationC === b.hottestDeviationC &&
          a.coldestDeviationC === b.coldestDeviationC &&
          a.uniformityClass === b.uniformityClass &&
          Math.abs(a.hottestDeviationC - c.hottestDeviationC) < 1e-9 &&
          Math.abs(a.coldestDeviationC - c.coldestDeviationC) < 1e-9
        );
      }),
    );
  });
  it('the class is the tightest AMS2750F Table 11 class whose ± tolerance holds both deviations', () => {
    fc.assert(
      fc.property(sensorsArb, (sensors) => {
        const r = uniformitySurvey({ setpointC: 120, sensors });
        const worst = Math.max(Math.abs(r.hottestDeviationC), Math.abs(r.coldestDeviationC));
        const expected = AMS2750_CLASSES.filter((c) => c.toleranceC >= worst).sort((x, y) => x.toleranceC - y.toleranceC)[0];
        return r.uniformityClass === (expected?.class ?? null);
      }),
    );
  });
});

describe('cross-cut class: monotone in the area removed (ISO 2409 / ASTM D3359 bands)', () => {
  it('more area removed never gives a better class, and ISO class + D3359 number = 5', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }), (a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        const x = crosscutClass({ percentRemoved: lo });
        const y = crosscutClass({ percentRemoved: hi });
        return x.iso2409 <= y.iso2409 && x.iso2409 + Number(x.astmD3359[0]) === 5;
      }),
    );
  });
});
