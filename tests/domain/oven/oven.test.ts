import { describe, expect, it } from 'vitest';
import { AMS2750F_CLASSES, uniformitySurvey } from '../../../src/lib/domain/oven/uniformity';
import { astmE230Tolerance, iecTolerance } from '../../../src/lib/domain/oven/thermocouple';
import { UniformityInputSchema } from '../../../src/lib/shared/calc';

const sensors = (readings: Record<string, number[]>) =>
  Object.entries(readings).map(([name, readingsC]) => ({ name, readingsC }));

describe('uniformitySurvey — AMS2750G furnace classes (1 ±3, 2 ±6, 3 ±8, 4 ±10, 5 ±14, 6 ±28 °C)', () => {
  const cases: {
    name: string;
    r: Record<string, number[]>;
    hot: number;
    cold: number;
    hs: string;
    cs: string;
    g: number | null;
    f: number | null;
  }[] = [
    {
      name: 'within ±3',
      r: { TC1: [121.5, 122.5], TC2: [117.1, 118], TC3: [120] },
      hot: 2.5,
      cold: -2.9,
      hs: 'TC1',
      cs: 'TC2',
      g: 1,
      f: 1,
    },
    { name: 'exactly ±3 is class 1 (inclusive)', r: { A: [123], B: [117] }, hot: 3, cold: -3, hs: 'A', cs: 'B', g: 1, f: 1 },
    {
      name: '+5.5 → class 2 in rev G, class 3 in rev F',
      r: { A: [125.5], B: [119] },
      hot: 5.5,
      cold: -1,
      hs: 'A',
      cs: 'B',
      g: 2,
      f: 3,
    },
    {
      name: '−7.5 → class 3 in rev G, class 4 in rev F',
      r: { A: [121], B: [112.5] },
      hot: 1,
      cold: -7.5,
      hs: 'A',
      cs: 'B',
      g: 3,
      f: 4,
    },
    { name: 'all below setpoint', r: { A: [110], B: [108] }, hot: -10, cold: -12, hs: 'A', cs: 'B', g: 5, f: 5 },
    { name: 'outside every class', r: { A: [150], B: [120] }, hot: 30, cold: 0, hs: 'A', cs: 'B', g: null, f: null },
  ];
  for (const c of cases) {
    it(`${c.name} (AMS2750G / AMS2750F class tables; deviations hand-computed)`, () => {
      const g = uniformitySurvey({ setpointC: 120, sensors: sensors(c.r) });
      expect(g.hottestDeviationC).toBeCloseTo(c.hot, 9);
      expect(g.coldestDeviationC).toBeCloseTo(c.cold, 9);
      expect(g.hottestSensor).toBe(c.hs);
      expect(g.coldestSensor).toBe(c.cs);
      expect(g.uniformityClass).toBe(c.g);
      if (c.g === null) expect(g.message).toBe('outside every class');
      expect(uniformitySurvey({ setpointC: 120, sensors: sensors(c.r), classTable: AMS2750F_CLASSES }).uniformityClass).toBe(c.f);
    });
  }

  it('ignores readings before the stabilised index and applies sensor corrections', () => {
    const r = uniformitySurvey({
      setpointC: 120,
      stabilisedFromIndex: 2,
      sensors: [
        { name: 'A', readingsC: [60, 100, 121, 122] },
        { name: 'B', readingsC: [55, 95, 119, 120], correctionC: -1 },
      ],
    });
    expect(r.hottestDeviationC).toBeCloseTo(2, 9);
    expect(r.coldestDeviationC).toBeCloseTo(-2, 9);
    expect(r.uniformityClass).toBe(1);
  });

  it('schema: empty sensors rejected at sensors; a parsed body is answered by the domain', () => {
    const bad = UniformityInputSchema.safeParse({ setpointC: 120, sensors: [] });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.path).toEqual(['sensors']);
    const ok = UniformityInputSchema.parse({ setpointC: 120, sensors: [{ name: 'A', readingsC: [121] }] });
    expect(uniformitySurvey(ok)).toMatchObject({ hottestDeviationC: 1, coldestDeviationC: 1, uniformityClass: 1 });
  });

  it('throws on no sensors in the domain too', () => {
    expect(() => uniformitySurvey({ setpointC: 120, sensors: [] })).toThrow(RangeError);
  });
});

describe('iecTolerance — IEC 60584-1 tolerance classes', () => {
  const cases = [
    { type: 'K', cls: 1, t: 100, tol: 1.5, source: 'IEC 60584-1 tolerance table, K class 1 (±1.5 °C)' },
    { type: 'K', cls: 1, t: 500, tol: 2.0, source: 'IEC 60584-1 tolerance table, K class 1 (0.004·|t|)' },
    { type: 'K', cls: 1, t: 375, tol: 1.5, source: 'IEC 60584-1, K class 1 at the changeover' },
    { type: 'K', cls: 2, t: 120, tol: 2.5, source: 'IEC 60584-1 tolerance table, K class 2 (±2.5 °C)' },
    { type: 'K', cls: 2, t: 500, tol: 3.75, source: 'IEC 60584-1 tolerance table, K class 2 (0.0075·|t|)' },
    { type: 'N', cls: 1, t: 800, tol: 3.2, source: 'IEC 60584-1, N class 1 (from memory)' },
    { type: 'J', cls: 2, t: 400, tol: 3.0, source: 'IEC 60584-1, J class 2 (from memory)' },
    { type: 'T', cls: 1, t: 200, tol: 0.8, source: 'IEC 60584-1, T class 1 (from memory)' },
    { type: 'T', cls: 1, t: 100, tol: 0.5, source: 'IEC 60584-1, T class 1 (from memory)' },
    { type: 'E', cls: 2, t: 120, tol: 2.5, source: 'IEC 60584-1, E class 2 (from memory)' },
    { type: 'K', cls: 3, t: -180, tol: 2.7, source: 'IEC 60584-1, K class 3 (from memory)' },
  ] as const;
  for (const c of cases) {
    it(`type ${c.type} class ${c.cls} at ${c.t} °C → ±${c.tol} °C (${c.source})`, () => {
      expect(iecTolerance(c.type, c.cls, c.t).toleranceC).toBeCloseTo(c.tol, 9);
    });
  }
  it('outside the class range or a class the type lacks → null with a reason', () => {
    expect(iecTolerance('K', 1, 1100).toleranceC).toBeNull();
    expect(iecTolerance('K', 2, -60).toleranceC).toBeNull();
    const j3 = iecTolerance('J', 3, -100);
    expect(j3.toleranceC).toBeNull();
    expect(j3.reason).toMatch(/not defined/);
  });
});

describe('astmE230Tolerance — ASTM E230 limits of error', () => {
  const cases = [
    { type: 'K', grade: 'standard', t: 100, tol: 2.2, source: 'ASTM E230, K standard ±2.2 °C' },
    { type: 'K', grade: 'standard', t: 500, tol: 3.75, source: 'ASTM E230, K standard 0.75 %' },
    { type: 'K', grade: 'special', t: 500, tol: 2.0, source: 'ASTM E230, K special 0.4 % (from memory)' },
    { type: 'J', grade: 'standard', t: 200, tol: 2.2, source: 'ASTM E230, J standard (from memory)' },
    { type: 'T', grade: 'standard', t: 200, tol: 1.5, source: 'ASTM E230, T standard 0.75 % (from memory)' },
    { type: 'E', grade: 'standard', t: 500, tol: 2.5, source: 'ASTM E230, E standard 0.5 % (from memory)' },
  ] as const;
  for (const c of cases) {
    it(`type ${c.type} ${c.grade} at ${c.t} °C → ±${c.tol} °C (${c.source})`, () => {
      expect(astmE230Tolerance(c.type, c.grade, c.t).toleranceC).toBeCloseTo(c.tol, 9);
    });
  }
  it('outside the tabled range → null', () => {
    expect(astmE230Tolerance('T', 'standard', 400).toleranceC).toBeNull();
  });
});
