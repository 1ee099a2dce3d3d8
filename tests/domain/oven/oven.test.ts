import { describe, expect, it } from 'vitest';
import { AMS2750_TIGHTER_C_CLASSES, uniformitySurvey } from '../../../src/lib/domain/oven/uniformity';
import { astmE230Tolerance, iecTolerance } from '../../../src/lib/domain/oven/thermocouple';
import { UniformityInputSchema } from '../../../src/lib/shared/calc';

const sensors = (readings: Record<string, number[]>) =>
  Object.entries(readings).map(([name, readingsC]) => ({ name, readingsC }));

describe('uniformitySurvey — AMS2750F Table 11 furnace classes (1 ±3, 2 ±6, 3 ±8, 4 ±10, 5 ±14, 6 ±28 °C)', () => {
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
    it(`${c.name} (AMS2750F Table 11 and its tighter °C note; deviations hand-computed)`, () => {
      const g = uniformitySurvey({ setpointC: 120, sensors: sensors(c.r) });
      expect(g.hottestDeviationC).toBeCloseTo(c.hot, 9);
      expect(g.coldestDeviationC).toBeCloseTo(c.cold, 9);
      expect(g.hottestSensor).toBe(c.hs);
      expect(g.coldestSensor).toBe(c.cs);
      expect(g.uniformityClass).toBe(c.g);
      if (c.g === null) expect(g.message).toBe('outside every class');
      expect(
        uniformitySurvey({ setpointC: 120, sensors: sensors(c.r), classTable: AMS2750_TIGHTER_C_CLASSES }).uniformityClass,
      ).toBe(c.f);
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
    { type: 'N', cls: 1, t: 800, tol: 3.2, source: 'IEC 60584 class table as reproduced publicly: N class 1 0.004·|t|' },
    { type: 'J', cls: 2, t: 400, tol: 3.0, source: 'IEC 60584 class table as reproduced publicly: J class 2 0.0075·|t|' },
    { type: 'T', cls: 1, t: 200, tol: 0.8, source: 'IEC 60584 table as reproduced publicly: T class 1 125…350 °C 0.004·|t|' },
    { type: 'T', cls: 1, t: 100, tol: 0.5, source: 'IEC 60584 table as reproduced publicly: T class 1 −40…125 °C ±0.5' },
    { type: 'E', cls: 2, t: 120, tol: 2.5, source: 'IEC 60584 table as reproduced publicly: E class 2 −40…333 °C ±2.5' },
    { type: 'K', cls: 3, t: -180, tol: 2.7, source: 'IEC 60584 table as reproduced publicly: K class 3 −200…−167 °C 0.015·|t|' },
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
    { type: 'K', grade: 'special', t: 500, tol: 2.0, source: 'ASTM E230 Table 1 (public reproductions): K special 0.4 %' },
    { type: 'J', grade: 'standard', t: 200, tol: 2.2, source: 'ASTM E230 Table 1 (public reproductions): J standard ±2.2' },
    { type: 'T', grade: 'standard', t: 200, tol: 1.5, source: 'ASTM E230 Table 1 (public reproductions): T standard 0.75 %' },
    { type: 'E', grade: 'standard', t: 500, tol: 2.5, source: 'ASTM E230 Table 1 (public reproductions): E standard 0.5 %' },
  ] as const;
  for (const c of cases) {
    it(`type ${c.type} ${c.grade} at ${c.t} °C → ±${c.tol} °C (${c.source})`, () => {
      expect(astmE230Tolerance(c.type, c.grade, c.t).toleranceC).toBeCloseTo(c.tol, 9);
    });
  }
  it('outside the tabled range → null', () => {
    expect(astmE230Tolerance('T', 'standard', 400).toleranceC).toBeNull();
  });
  // Review W6: E230 Table 1 ranges J 0–760, K/N 0–1260, T 0–370, E 0–870 °C (public
  // reproductions of the table by wire and sensor makers agree).
  it.each([
    ['T', 360, 2.7],
    ['T', 370, 2.775],
    ['J', 755, 5.6625],
    ['J', 760, 5.7],
    ['K', 1258, 9.435],
    ['N', 1260, 9.45],
    ['E', 870, 4.35],
  ] as const)('type %s standard at %f °C → ±%f °C (E230 Table 1 range, review W6)', (type, t, tol) => {
    expect(astmE230Tolerance(type, 'standard', t).toleranceC).toBeCloseTo(tol, 9);
  });
  it.each([
    ['E', 890],
    ['T', 371],
    ['J', 761],
    ['K', 1261],
  ] as const)('type %s at %f °C is outside E230 Table 1 → null (review W6)', (type, t) => {
    expect(astmE230Tolerance(type, 'standard', t).toleranceC).toBeNull();
  });
});

describe('IEC 60584 classes against the split-range form of the same table (second representation)', () => {
  // Public reproductions print each class as two ranges, a fixed tolerance up to the changeover
  // and a fraction of |t| above it: K/N/E/J class 1 changeover 375 °C, class 2 333 °C; T class 1
  // 125 °C, class 2 133 °C.
  it.each([
    ['K', 1, 375, 0.004, -40, 1000],
    ['K', 2, 333, 0.0075, -40, 1200],
    ['E', 1, 375, 0.004, -40, 800],
    ['E', 2, 333, 0.0075, -40, 900],
    ['J', 1, 375, 0.004, -40, 750],
    ['J', 2, 333, 0.0075, -40, 750],
    ['T', 1, 125, 0.004, -40, 350],
    ['T', 2, 133, 0.0075, -40, 350],
  ] as const)('type %s class %i: fixed below %f °C, %f·|t| above (%f…%f °C)', (type, cls, change, fraction, from, to) => {
    const fixed = iecTolerance(type, cls, from).toleranceC!;
    for (let t = from; t <= to; t += 0.5) {
      const tol = iecTolerance(type, cls, t).toleranceC!;
      // The printed changeovers are rounded to whole degrees (fixed/fraction = 333.3 or 133.3).
      if (t <= change) expect(tol).toBeCloseTo(fixed, 12);
      else if (t >= change + 1) expect(tol).toBeCloseTo(fraction * t, 12);
    }
  });
});
