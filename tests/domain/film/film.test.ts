import { describe, expect, it } from 'vitest';
import {
  calibrateThicknessConstant,
  capillaryLengthMm,
  dipThickness,
  theoreticalThicknessConstant,
  withdrawalSpeedForThickness,
} from '../../../src/lib/domain/film/dip-coat';
import { bathAddition, bathAge } from '../../../src/lib/domain/film/bath-maintenance';
import { DipThicknessInputSchema } from '../../../src/lib/shared/calc';

describe('dipThickness — continuous drag-out model (Landau & Levich 1942; Derjaguin 1943; White & Tallmadge 1965)', () => {
  // Expected values: the published equation N/(1 − N²)^(2/3) = 0.94·Ca^(1/6), h = N·√(ηU/(ρg))
  // (the form quoted in Deen, Analysis of Transport Phenomena, with Landau–Levich's 0.94), solved
  // independently by bisection in Python 3 (g = 9.80665 m/s²):
  // η 5 mPa·s, U 2 mm/s, γ 25 mN/m, ρ 900 kg/m³ → Ca = 4.0e-4, ℓc = 1.683017 mm, h = 8.2418126 µm
  // (pure Landau–Levich 0.94·ℓc·Ca^(2/3) would give 8.5886 µm: drainage takes 4 %); dry at φ 0.25 = 2.0604531 µm.
  const cases = [
    {
      name: 'typical hard-coat bath, Landau–Levich regime',
      input: { viscosityMPaS: 5, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900, solidsVolumeFraction: 0.25 },
      ca: 4.0e-4,
      lcMm: 1.6830166,
      wetUm: 8.2418126,
      dryUm: 2.0604531,
      regime: 'landau-levich',
      source: 'published equation solved in Python',
    },
    {
      // η 500 mPa·s, U 5 mm/s → Ca = 0.1 > 1e-2 → h = 276.40338 µm (Python bisection), i.e.
      // 0.519·√(ηU/(ρg)); Brinker & Scherer's rough 0.8·√(ηU/(ρg)) applies nearer Ca ≈ 1–10.
      name: 'thick syrup, above the Ca bound',
      input: { viscosityMPaS: 500, speedMmS: 5, surfaceTensionMNm: 25, densityKgM3: 900 },
      ca: 0.1,
      lcMm: 1.6830166,
      wetUm: 276.40338,
      dryUm: undefined,
      regime: 'gravity-viscous',
      source: 'published equation solved in Python',
    },
  ] as const;
  for (const c of cases) {
    it(`${c.name} (${c.source})`, () => {
      const r = dipThickness(c.input);
      expect(r.capillaryNumber).toBeCloseTo(c.ca, 12);
      expect(r.capillaryLengthMm).toBeCloseTo(c.lcMm, 6);
      expect(r.wetThicknessUm).toBeCloseTo(c.wetUm, 4);
      expect(r.regime).toBe(c.regime);
      if (c.dryUm === undefined) expect(r.dryThicknessUm).toBeUndefined();
      else expect(r.dryThicknessUm).toBeCloseTo(c.dryUm, 5);
      expect(r.warnings.length > 0).toBe(c.regime === 'gravity-viscous');
    });
  }

  it('low-Ca limit is Landau–Levich 0.94·ℓc·Ca^(2/3): ratio → 1 (within 0.1 % at Ca 1e-9)', () => {
    // η 1 mPa·s, U 1e-5 mm/s, γ 10 mN/m → Ca = 1e-9; the first drainage correction is (2/3)(0.94)²Ca^(1/3) ≈ 6e-4.
    const r = dipThickness({ viscosityMPaS: 1, speedMmS: 1e-5, surfaceTensionMNm: 10, densityKgM3: 950 });
    const lc = capillaryLengthMm(10, 950) * 1e-3;
    const ll = 0.94 * lc * Math.pow(r.capillaryNumber, 2 / 3) * 1e6;
    expect(r.wetThicknessUm / ll).toBeGreaterThan(0.999);
    expect(r.wetThicknessUm / ll).toBeLessThan(1);
  });

  it('Ca exactly 1e-2 is still Landau–Levich (bound inclusive; the 1e-2 bound is common practice)', () => {
    // η 125 mPa·s, U 2 mm/s, γ 25 mN/m → Ca = 0.01.
    expect(dipThickness({ viscosityMPaS: 125, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900 }).regime).toBe(
      'landau-levich',
    );
  });

  it('accepts a schema-parsed body and rejects a bad one in the domain too', () => {
    const body = DipThicknessInputSchema.parse({ viscosityMPaS: 5, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900 });
    expect(dipThickness(body).dryThicknessUm).toBeUndefined();
    expect(() => dipThickness({ ...body, speedMmS: 0 })).toThrow(RangeError);
    expect(() => dipThickness({ ...body, solidsVolumeFraction: 1.5 })).toThrow(RangeError);
  });

  it('theoretical constant C = 0.94/(γ^(1/6)(ρg)^(1/2)) in µm/(mPa·s·mm/s)^(2/3) (hand-computed 1.85036)', () => {
    expect(theoreticalThicknessConstant(25, 900)).toBeCloseTo(1.8503601, 6);
  });
});

describe('withdrawalSpeedForThickness — the continuous model inverted', () => {
  it('dry 2 µm at φ 0.25 → wet 8 µm → U = 1.9109349 mm/s, Ca 3.8218699e-4 (published equation inverted by bisection in Python)', () => {
    const a = withdrawalSpeedForThickness({
      viscosityMPaS: 5,
      targetDryThicknessUm: 2,
      solidsVolumeFraction: 0.25,
      surfaceTensionMNm: 25,
      densityKgM3: 900,
    });
    expect(a.model).toBe('landau-levich');
    expect(a.speedMmS).toBeCloseTo(1.9109349, 6);
    expect(a.capillaryNumber).toBeCloseTo(3.8218699e-4, 10);
  });

  it('round-trips with dipThickness (the advised speed gives the target)', () => {
    const a = withdrawalSpeedForThickness({
      viscosityMPaS: 8,
      targetWetThicknessUm: 10,
      surfaceTensionMNm: 24,
      densityKgM3: 920,
    });
    expect(
      dipThickness({ viscosityMPaS: 8, speedMmS: a.speedMmS, surfaceTensionMNm: 24, densityKgM3: 920 }).wetThicknessUm,
    ).toBeCloseTo(10, 9);
  });

  it('round-trips in the gravity–viscous regime too, with a warning', () => {
    const a = withdrawalSpeedForThickness({
      viscosityMPaS: 500,
      targetWetThicknessUm: 400,
      surfaceTensionMNm: 25,
      densityKgM3: 900,
    });
    expect(a.model).toBe('gravity-viscous');
    expect(a.warnings).toHaveLength(1);
    const r = dipThickness({ viscosityMPaS: 500, speedMmS: a.speedMmS, surfaceTensionMNm: 25, densityKgM3: 900 });
    expect(r.regime).toBe('gravity-viscous');
    expect(r.wetThicknessUm).toBeCloseTo(400, 6);
  });

  it('calibrated C: U = (h/C)^(3/2)/η = 0.224811 mm/s for C 1.85, h 2 µm, η 5 (hand-computed)', () => {
    const a = withdrawalSpeedForThickness({ viscosityMPaS: 5, targetDryThicknessUm: 2, thicknessConstant: 1.85 });
    expect(a.model).toBe('calibrated');
    expect(a.speedMmS).toBeCloseTo(0.2248109, 6);
  });

  it('refuses an ambiguous or incomplete request', () => {
    expect(() => withdrawalSpeedForThickness({ viscosityMPaS: 5, surfaceTensionMNm: 25, densityKgM3: 900 })).toThrow(
      /exactly one/,
    );
    expect(() =>
      withdrawalSpeedForThickness({ viscosityMPaS: 5, targetDryThicknessUm: 2, surfaceTensionMNm: 25, densityKgM3: 900 }),
    ).toThrow(/solidsVolumeFraction/);
    expect(() => withdrawalSpeedForThickness({ viscosityMPaS: 5, targetWetThicknessUm: 2 })).toThrow(/surfaceTension/);
  });
});

describe('calibrateThicknessConstant — least squares in log space', () => {
  it('recovers C and 2/3 from an exact power law (constructed data)', () => {
    const points = [0.5, 1, 2, 3, 4].map((u, i) => {
      const eta = 4 + i;
      return { speedMmS: u, viscosityMPaS: eta, thicknessUm: 1.85 * Math.pow(eta * u, 2 / 3) };
    });
    const cal = calibrateThicknessConstant(points);
    expect(cal.fixedExponent.constant).toBeCloseTo(1.85, 10);
    expect(cal.fixedExponent.rSquared).toBeCloseTo(1, 10);
    expect(cal.fixedExponent.residualSdUm).toBeCloseTo(0, 10);
    expect(cal.fixedExponent.n).toBe(5);
    expect(cal.freeExponent?.exponent).toBeCloseTo(2 / 3, 10);
    expect(cal.freeExponent?.constant).toBeCloseTo(1.85, 8);
  });

  it('two points, fixed exponent: C = exp(mean(ln h − (2/3) ln ηU)) = 2.049390 (hand-computed)', () => {
    // (ηU 1, h 2.0) and (ηU 8, h 8.4): ln C = (0.693147 + 0.741937)/2; residual SD (ln) 0.0344999; r² 0.998844.
    const cal = calibrateThicknessConstant([
      { speedMmS: 1, viscosityMPaS: 1, thicknessUm: 2 },
      { speedMmS: 2, viscosityMPaS: 4, thicknessUm: 8.4 },
    ]);
    expect(cal.fixedExponent.constant).toBeCloseTo(2.0493902, 6);
    expect(cal.fixedExponent.exponent).toBeCloseTo(2 / 3, 12);
    expect(cal.fixedExponent.residualSdLog).toBeCloseTo(0.0344999, 6);
    expect(cal.fixedExponent.rSquared).toBeCloseTo(0.9988441, 6);
    expect(cal.freeExponent).toBeNull();
  });

  it('free exponent: h = 3·(ηU)^0.5 through (1,3), (4,6), (9,9) (hand-computed)', () => {
    const cal = calibrateThicknessConstant([
      { speedMmS: 1, viscosityMPaS: 1, thicknessUm: 3 },
      { speedMmS: 2, viscosityMPaS: 2, thicknessUm: 6 },
      { speedMmS: 3, viscosityMPaS: 3, thicknessUm: 9 },
    ]);
    expect(cal.freeExponent?.exponent).toBeCloseTo(0.5, 10);
    expect(cal.freeExponent?.constant).toBeCloseTo(3, 10);
    expect(cal.freeExponent?.rSquared).toBeCloseTo(1, 10);
    expect(cal.fixedExponent.rSquared).toBeLessThan(1);
  });

  it('needs at least two measurements', () => {
    expect(() => calibrateThicknessConstant([{ speedMmS: 1, viscosityMPaS: 1, thicknessUm: 1 }])).toThrow(RangeError);
  });
});

describe('bathAddition — solids mass balance (hand-computed)', () => {
  const cases = [
    // m_solvent = 100·(30/25 − 1) = 20 kg → 120 kg at 25 %.
    {
      name: 'solvent top-up 30 → 25 %',
      input: { bathMassKg: 100, solidsNowPct: 30, solidsTargetPct: 25 },
      kind: 'solvent',
      mass: 20,
      after: 120,
    },
    // m_add = 100·(25 − 20)/(40 − 25) = 33.333 kg.
    {
      name: 'fresh lacquer 20 → 25 % with 40 % lacquer',
      input: { bathMassKg: 100, solidsNowPct: 20, solidsTargetPct: 25, lacquerSolidsPct: 40 },
      kind: 'lacquer',
      mass: 100 / 3,
      after: 100 + 100 / 3,
    },
    {
      name: 'already on target',
      input: { bathMassKg: 80, solidsNowPct: 25, solidsTargetPct: 25 },
      kind: 'none',
      mass: 0,
      after: 80,
    },
  ] as const;
  for (const c of cases) {
    it(c.name, () => {
      const r = bathAddition(c.input);
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(r.kind).toBe(c.kind);
      expect(r.massKg).toBeCloseTo(c.mass, 9);
      expect(r.resultingBathMassKg).toBeCloseTo(c.after, 9);
      // Solids mass conserved: s_now·m_bath (+ s_lacquer·m_add) = s_target·m_after.
      const lacquer = 'lacquerSolidsPct' in c.input ? c.input.lacquerSolidsPct : 0;
      const solidsIn = c.input.solidsNowPct * c.input.bathMassKg + (c.kind === 'lacquer' ? lacquer * r.massKg : 0);
      expect(solidsIn).toBeCloseTo(c.input.solidsTargetPct * r.resultingBathMassKg, 9);
    });
  }

  const refusals = [
    {
      name: 'lacquer no richer than target',
      input: { bathMassKg: 100, solidsNowPct: 20, solidsTargetPct: 25, lacquerSolidsPct: 25 },
      reason: /above the target/,
    },
    {
      name: 'raise without lacquer solids',
      input: { bathMassKg: 100, solidsNowPct: 20, solidsTargetPct: 25 },
      reason: /lacquer/,
    },
    { name: 'solvent to 0 %', input: { bathMassKg: 100, solidsNowPct: 20, solidsTargetPct: 0 }, reason: /above 0/ },
    {
      name: 'tank too small',
      input: { bathMassKg: 100, solidsNowPct: 30, solidsTargetPct: 25, maxBathMassKg: 110 },
      reason: /tank/,
    },
    {
      name: 'solids over 100 %',
      input: { bathMassKg: 100, solidsNowPct: 130, solidsTargetPct: 25 },
      reason: /between 0 and 100/,
    },
  ];
  for (const c of refusals) {
    it(`refuses: ${c.name}`, () => {
      const r = bathAddition(c.input);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(c.reason);
    });
  }
});

describe('bathAge — pot life (near-end at 80 %, common practice)', () => {
  const day = 86_400_000;
  const t0 = Date.UTC(2024, 0, 1);
  const cases = [
    { days: 10, life: 30, status: 'ok' },
    { days: 24, life: 30, status: 'near-end' }, // exactly 80 % → near-end (≥)
    { days: 29.9, life: 30, status: 'near-end' },
    { days: 30, life: 30, status: 'expired' }, // exactly 100 % → expired (≥)
  ] as const;
  for (const c of cases) {
    it(`${c.days} of ${c.life} days → ${c.status}`, () => {
      const r = bathAge({ chargedAtMs: t0, nowMs: t0 + c.days * day, potLifeDays: c.life });
      expect(r.ageDays).toBeCloseTo(c.days, 9);
      expect(r.potLifeFractionUsed).toBeCloseTo(c.days / c.life, 9);
      expect(r.status).toBe(c.status);
    });
  }
  it('refuses now before the charge', () => {
    expect(() => bathAge({ chargedAtMs: t0, nowMs: t0 - 1, potLifeDays: 30 })).toThrow(RangeError);
  });
});
