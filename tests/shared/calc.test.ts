import { describe, expect, it } from 'vitest';
import {
  AbrasionInputSchema,
  ActivationEnergyInputSchema,
  BathAdditionInputSchema,
  CalibrationInputSchema,
  CrosscutInputSchema,
  CrosscutOutputSchema,
  CureEquivalentInputSchema,
  CureEquivalentOutputSchema,
  DipThicknessInputSchema,
  DipThicknessOutputSchema,
  FringeThicknessInputSchema,
  FringeThicknessOutputSchema,
  SpeedAdvisorInputSchema,
  UniformityInputSchema,
  UniformityOutputSchema,
  ViscosityCupInputSchema,
  ViscosityCupOutputSchema,
} from '../../src/lib/shared/calc';
import { dipThickness, calibrateThicknessConstant, withdrawalSpeedForThickness } from '../../src/lib/domain/film/dip-coat';
import { viscosityFromCup } from '../../src/lib/domain/film/viscosity-cups';
import { bathAddition } from '../../src/lib/domain/film/bath-maintenance';
import { activationEnergyForEquivalence, cureEquivalent } from '../../src/lib/domain/cure/arrhenius';
import { fringeThickness } from '../../src/lib/domain/quality/fringes';
import { crosscutClass } from '../../src/lib/domain/quality/crosscut';
import { bayerRatio } from '../../src/lib/domain/quality/abrasion';
import { uniformitySurvey } from '../../src/lib/domain/oven/uniformity';

type Schema = { safeParse: (v: unknown) => { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } } };

const rejections: { name: string; schema: Schema; body: unknown; path: (string | number)[]; message?: RegExp }[] = [
  {
    name: 'negative viscosity',
    schema: DipThicknessInputSchema,
    body: { viscosityMPaS: -1, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900 },
    path: ['viscosityMPaS'],
    message: /greater than 0/,
  },
  {
    name: 'zero speed',
    schema: DipThicknessInputSchema,
    body: { viscosityMPaS: 5, speedMmS: 0, surfaceTensionMNm: 25, densityKgM3: 900 },
    path: ['speedMmS'],
    message: /greater than 0/,
  },
  {
    name: 'viscosity as a string',
    schema: DipThicknessInputSchema,
    body: { viscosityMPaS: '5', speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900 },
    path: ['viscosityMPaS'],
    message: /finite number/,
  },
  {
    name: 'infinite density',
    schema: DipThicknessInputSchema,
    body: { viscosityMPaS: 5, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: Infinity },
    path: ['densityKgM3'],
  },
  {
    name: 'solids fraction above 1',
    schema: DipThicknessInputSchema,
    body: { viscosityMPaS: 5, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 900, solidsVolumeFraction: 25 },
    path: ['solidsVolumeFraction'],
  },
  { name: 'unknown cup', schema: ViscosityCupInputSchema, body: { cup: 'ford-7', seconds: 40 }, path: ['cup'] },
  {
    name: 'lambda2 equal to lambda1',
    schema: FringeThicknessInputSchema,
    body: { lambda1Nm: 600, lambda2Nm: 600, refractiveIndex: 1.5 },
    path: ['lambda2Nm'],
    message: /greater than lambda2Nm/,
  },
  {
    name: 'lambda2 above lambda1',
    schema: FringeThicknessInputSchema,
    body: { lambda1Nm: 600, lambda2Nm: 650, refractiveIndex: 1.5 },
    path: ['lambda2Nm'],
  },
  {
    name: 'fractional fringe count',
    schema: FringeThicknessInputSchema,
    body: { lambda1Nm: 600, lambda2Nm: 500, refractiveIndex: 1.5, fringes: 1.5 },
    path: ['fringes'],
  },
  {
    name: 'empty sensors',
    schema: UniformityInputSchema,
    body: { setpointC: 120, sensors: [] },
    path: ['sensors'],
    message: /at least one sensor/,
  },
  {
    name: 'sensor without readings',
    schema: UniformityInputSchema,
    body: { setpointC: 120, sensors: [{ name: 'A', readingsC: [] }] },
    path: ['sensors', 0, 'readingsC'],
  },
  {
    name: 'percent > 100',
    schema: CrosscutInputSchema,
    body: { percentRemoved: 100.5 },
    path: ['percentRemoved'],
    message: /at most 100/,
  },
  { name: 'percent < 0', schema: CrosscutInputSchema, body: { percentRemoved: -1 }, path: ['percentRemoved'] },
  {
    name: 'one-point profile',
    schema: CureEquivalentInputSchema,
    body: { profile: [{ minutes: 0, tempC: 20 }], activationEnergyKJMol: 80, referenceC: 120 },
    path: ['profile'],
  },
  {
    name: 'decreasing minutes',
    schema: CureEquivalentInputSchema,
    body: {
      profile: [
        { minutes: 0, tempC: 20 },
        { minutes: 10, tempC: 60 },
        { minutes: 5, tempC: 90 },
      ],
      activationEnergyKJMol: 80,
      referenceC: 120,
    },
    path: ['profile', 2, 'minutes'],
    message: /must not decrease/,
  },
  {
    name: 'temperature below absolute zero',
    schema: CureEquivalentInputSchema,
    body: {
      profile: [
        { minutes: 0, tempC: -300 },
        { minutes: 10, tempC: 60 },
      ],
      activationEnergyKJMol: 80,
      referenceC: 120,
    },
    path: ['profile', 0, 'tempC'],
  },
  {
    name: 'zero activation energy',
    schema: CureEquivalentInputSchema,
    body: {
      profile: [
        { minutes: 0, tempC: 20 },
        { minutes: 10, tempC: 60 },
      ],
      activationEnergyKJMol: 0,
      referenceC: 120,
    },
    path: ['activationEnergyKJMol'],
  },
  {
    name: 'advisor with both targets',
    schema: SpeedAdvisorInputSchema,
    body: {
      viscosityMPaS: 5,
      targetDryThicknessUm: 2,
      targetWetThicknessUm: 8,
      surfaceTensionMNm: 25,
      densityKgM3: 900,
      solidsVolumeFraction: 0.25,
    },
    path: ['targetDryThicknessUm'],
  },
  {
    name: 'advisor without properties or constant',
    schema: SpeedAdvisorInputSchema,
    body: { viscosityMPaS: 5, targetWetThicknessUm: 8 },
    path: ['thicknessConstant'],
  },
  {
    name: 'calibration with one point',
    schema: CalibrationInputSchema,
    body: { points: [{ speedMmS: 1, viscosityMPaS: 5, thicknessUm: 2 }] },
    path: ['points'],
  },
  {
    name: 'bath solids over 100 %',
    schema: BathAdditionInputSchema,
    body: { bathMassKg: 100, solidsNowPct: 101, solidsTargetPct: 25 },
    path: ['solidsNowPct'],
  },
  {
    name: 'schedules at one temperature',
    schema: ActivationEnergyInputSchema,
    body: { scheduleA: { minutes: 60, tempC: 120 }, scheduleB: { minutes: 90, tempC: 120 } },
    path: ['scheduleB', 'tempC'],
  },
  {
    name: 'zero test haze gain',
    schema: AbrasionInputSchema,
    body: { referenceHazeGainPct: 12, testHazeGainPct: 0 },
    path: ['testHazeGainPct'],
  },
];

describe('calculator schemas reject bad bodies with field paths', () => {
  for (const r of rejections) {
    it(`${r.name} → ${r.path.join('.')}`, () => {
      const out = r.schema.safeParse(r.body);
      expect(out.success).toBe(false);
      const issue = out.error?.issues.find((i) => JSON.stringify(i.path) === JSON.stringify(r.path));
      expect(issue, JSON.stringify(out.error?.issues)).toBeDefined();
      if (r.message) expect(issue?.message).toMatch(r.message);
    });
  }
});

describe('each endpoint: schema-parsed body → domain function → contract output', () => {
  it('dip-thickness', () => {
    const out = dipThickness(
      DipThicknessInputSchema.parse({
        viscosityMPaS: 5,
        speedMmS: 2,
        surfaceTensionMNm: 25,
        densityKgM3: 900,
        solidsVolumeFraction: 0.25,
      }),
    );
    expect(DipThicknessOutputSchema.safeParse(out).success).toBe(true);
  });
  it('viscosity-cup', () => {
    const out = viscosityFromCup(ViscosityCupInputSchema.parse({ cup: 'ford-4', seconds: 200 }));
    expect(ViscosityCupOutputSchema.safeParse(out).success).toBe(true);
    expect(out.inRange).toBe(false);
  });
  it('cure-equivalent', () => {
    const out = cureEquivalent(
      CureEquivalentInputSchema.parse({
        profile: [
          { minutes: 0, tempC: 120 },
          { minutes: 60, tempC: 120 },
        ],
        activationEnergyKJMol: 80,
        referenceC: 120,
        thresholdC: 110,
      }),
    );
    expect(CureEquivalentOutputSchema.parse(out)).toEqual({ equivalentMinutes: 60, minutesAtOrAbove: 60 });
  });
  it('fringe-thickness', () => {
    const out = fringeThickness(FringeThicknessInputSchema.parse({ lambda1Nm: 600, lambda2Nm: 500, refractiveIndex: 1.6 }));
    expect(FringeThicknessOutputSchema.parse(out)).toEqual({ thicknessNm: 937.5 });
  });
  it('crosscut', () => {
    const out = crosscutClass(CrosscutInputSchema.parse({ percentRemoved: 10 }));
    expect(CrosscutOutputSchema.parse(out)).toEqual({ iso2409: 2, astmD3359: '3B' });
  });
  it('uniformity', () => {
    const out = uniformitySurvey(
      UniformityInputSchema.parse({
        setpointC: 120,
        sensors: [
          { name: 'A', readingsC: [124] },
          { name: 'B', readingsC: [119] },
        ],
      }),
    );
    expect(UniformityOutputSchema.parse(out)).toEqual({ hottestDeviationC: 4, coldestDeviationC: -1, uniformityClass: 2 });
  });
  it('speed advisor, calibration, bath addition, activation energy, abrasion', () => {
    expect(
      withdrawalSpeedForThickness(
        SpeedAdvisorInputSchema.parse({ viscosityMPaS: 5, targetDryThicknessUm: 2, thicknessConstant: 1.85 }),
      ).speedMmS,
    ).toBeGreaterThan(0);
    expect(
      calibrateThicknessConstant(
        CalibrationInputSchema.parse({
          points: [
            { speedMmS: 1, viscosityMPaS: 5, thicknessUm: 2 },
            { speedMmS: 2, viscosityMPaS: 5, thicknessUm: 3.1 },
          ],
        }).points,
      ).fixedExponent.n,
    ).toBe(2);
    expect(bathAddition(BathAdditionInputSchema.parse({ bathMassKg: 100, solidsNowPct: 30, solidsTargetPct: 25 })).ok).toBe(true);
    const ae = ActivationEnergyInputSchema.parse({
      scheduleA: { minutes: 60, tempC: 120 },
      scheduleB: { minutes: 120, tempC: 110 },
    });
    expect(activationEnergyForEquivalence(ae.scheduleA, ae.scheduleB).ok).toBe(true);
    expect(bayerRatio(AbrasionInputSchema.parse({ referenceHazeGainPct: 12, testHazeGainPct: 3 })).bayerRatio).toBe(4);
  });
});
