/**
 * Independent checks of the dip-coat film model: properties that must hold for any bath
 * (fast-check), the review's counter-examples (W3), and the two published limits of the
 * continuous model (Landau & Levich 1942 as Ca → 0; Derjaguin 1943 as Ca → ∞).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { dipThickness, drainageNumber, withdrawalSpeedForThickness } from '../../../src/lib/domain/film/dip-coat.ts';

const G = 9.80665;
const bath = fc.record({
  viscosityMPaS: fc.double({ min: 0.5, max: 5000, noNaN: true }),
  speedMmS: fc.double({ min: 0.01, max: 200, noNaN: true }),
  surfaceTensionMNm: fc.double({ min: 15, max: 75, noNaN: true }),
  densityKgM3: fc.double({ min: 700, max: 1600, noNaN: true }),
});

describe('advisor and forward model agree everywhere (review W3)', () => {
  it('property: advisor(forward(U)) = U to 1e-9, for Ca from about 1e-7 to 1e4', () => {
    fc.assert(
      fc.property(bath, (b) => {
        const h = dipThickness(b).wetThicknessUm;
        const a = withdrawalSpeedForThickness({ ...b, targetWetThicknessUm: h });
        return Math.abs(a.speedMmS / b.speedMmS - 1) < 1e-9;
      }),
      { numRuns: 300 },
    );
  });
  it('property: forward(advisor(h)) = h for a dry target through φ', () => {
    fc.assert(
      fc.property(
        bath,
        fc.double({ min: 0.5, max: 200, noNaN: true }),
        fc.double({ min: 0.05, max: 0.6, noNaN: true }),
        (b, dry, phi) => {
          const a = withdrawalSpeedForThickness({ ...b, targetDryThicknessUm: dry, solidsVolumeFraction: phi });
          const r = dipThickness({ ...b, speedMmS: a.speedMmS, solidsVolumeFraction: phi });
          return (
            Math.abs((r.dryThicknessUm ?? Number.NaN) / dry - 1) < 1e-9 &&
            (a.model === 'landau-levich') === (r.regime === 'landau-levich')
          );
        },
      ),
      { numRuns: 200 },
    );
  });
  it('review counter-example: 100 µm wet at η 100 mPa·s (γ 25, ρ 900): the advised speed gives 100 µm forward', () => {
    const a = withdrawalSpeedForThickness({
      viscosityMPaS: 100,
      targetWetThicknessUm: 100,
      surfaceTensionMNm: 25,
      densityKgM3: 900,
    });
    const r = dipThickness({ viscosityMPaS: 100, speedMmS: a.speedMmS, surfaceTensionMNm: 25, densityKgM3: 900 });
    expect(r.wetThicknessUm).toBeCloseTo(100, 6);
  });
  it('review counter-example: no jump at Ca = 1e-2 (η 124.9 → 125.1 mPa·s at 2 mm/s changes h by < 0.2 %, not 1.84×)', () => {
    const at = (eta: number) =>
      dipThickness({ viscosityMPaS: eta, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900 }).wetThicknessUm;
    const ratio = at(125.1) / at(124.9);
    expect(ratio).toBeGreaterThan(1);
    expect(ratio).toBeLessThan(1.002);
  });
});

describe('monotone and smooth (properties)', () => {
  it('h strictly increases with withdrawal speed', () => {
    fc.assert(
      fc.property(bath, fc.double({ min: 1.0001, max: 10, noNaN: true }), (b, k) => {
        return dipThickness({ ...b, speedMmS: b.speedMmS * k }).wetThicknessUm > dipThickness(b).wetThicknessUm;
      }),
    );
  });
  it('h strictly increases with viscosity', () => {
    fc.assert(
      fc.property(bath, fc.double({ min: 1.0001, max: 10, noNaN: true }), (b, k) => {
        return dipThickness({ ...b, viscosityMPaS: b.viscosityMPaS * k }).wetThicknessUm > dipThickness(b).wetThicknessUm;
      }),
    );
  });
  it('h lies between the two limits: below Landau–Levich 0.94·ℓc·Ca^(2/3) and below Derjaguin √(ηU/(ρg))', () => {
    fc.assert(
      fc.property(bath, (b) => {
        const r = dipThickness(b);
        const lc = r.capillaryLengthMm * 1e-3;
        const ll = 0.94 * lc * Math.pow(r.capillaryNumber, 2 / 3) * 1e6;
        const dj = Math.sqrt((b.viscosityMPaS * 1e-3 * b.speedMmS * 1e-3) / (b.densityKgM3 * G)) * 1e6;
        return r.wetThicknessUm <= ll * (1 + 1e-12) && r.wetThicknessUm <= dj * (1 + 1e-12);
      }),
    );
  });
});

describe('regime limits of the continuous model', () => {
  it('Ca → ∞: h/√(ηU/(ρg)) → 1 (Derjaguin 1943), with 1 − N ≈ ½(0.94·Ca^(1/6))^(−3/2) (series of the published equation)', () => {
    for (const ca of [1e6, 1e9, 1e12]) {
      const gap = 0.5 * Math.pow(0.94 * Math.pow(ca, 1 / 6), -1.5);
      expect(Math.abs((1 - drainageNumber(ca)) / gap - 1)).toBeLessThan(0.1);
    }
    expect(drainageNumber(1e12)).toBeGreaterThan(0.999);
  });
  it('Ca → 0: N/(0.94·Ca^(1/6)) → 1 (Landau & Levich 1942), with the first correction −(2/3)(0.94)²Ca^(1/3)', () => {
    for (const ca of [1e-12, 1e-9, 1e-6]) {
      const c = 0.94 * Math.pow(ca, 1 / 6);
      const n = drainageNumber(ca);
      // N = c(1 − N²)^(2/3) ⇒ N/c = 1 − (2/3)c² + O(c⁴) (series of the published equation).
      expect(Math.abs(n / c - (1 - (2 / 3) * c * c))).toBeLessThan(3 * c ** 4);
    }
  });
  it('N solves the published equation N/(1 − N²)^(2/3) = 0.94·Ca^(1/6) to 1e-12', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-10, max: 1e8, noNaN: true }), (ca) => {
        const n = drainageNumber(ca);
        return Math.abs(n / Math.pow(1 - n * n, 2 / 3) / (0.94 * Math.pow(ca, 1 / 6)) - 1) < 1e-9;
      }),
    );
  });
});
