import { describe, expect, it } from 'vitest';
import {
  GAS_CONSTANT_J_MOL_K,
  activationEnergyForEquivalence,
  activationEnergyForProfiles,
  arrheniusFactor,
  cureEquivalent,
  equivalentMinutes,
  minutesAtOrAbove,
} from '../../../src/lib/domain/cure/arrhenius';
import { cureRecord, ovenLoadPhase, type CureWindow, type OvenReading } from '../../../src/lib/domain/cure/cure-record';
import { ActivationEnergyInputSchema, CureEquivalentInputSchema } from '../../../src/lib/shared/calc';

// ASTM C1074 equivalent age: t_e = Σ exp(−Q(1/T_a − 1/T_s))·Δt, Q = E/R, T_a the interval's
// average temperature, T_s the reference, both in K. Q = 5000 K with T_s = 20 °C is the
// worked setting used below (Ea = Q·R = 41.572 kJ/mol ≈ the "40 kJ/mol" of the literature;
// the C1074 default Q value is quoted from memory).
const Q = 5000;
const EA_Q5000 = (Q * GAS_CONSTANT_J_MOL_K) / 1000;
const C1074 = { activationEnergyKJMol: EA_Q5000, referenceC: 20 };

describe('equivalentMinutes — ASTM C1074 equivalent age', () => {
  it('age-conversion factors at Q = 5000 K, T_s = 20 °C (hand-computed: 40 °C → 2.972269, 10 °C → 0.547512)', () => {
    expect(arrheniusFactor(40, C1074)).toBeCloseTo(2.9722687, 6);
    expect(arrheniusFactor(10, C1074)).toBeCloseTo(0.5475123, 6);
    expect(arrheniusFactor(20, C1074)).toBe(1);
  });

  it('profile 20→40 °C (60 min), 40 °C (60 min), 40→20 °C (60 min): t_e = 388.969966 min (hand-computed)', () => {
    // Interval means 30, 40, 30 °C: 60·1.7552820 + 60·2.9722687 + 60·1.7552820 = 388.96997.
    const profile = [
      { minutes: 0, tempC: 20 },
      { minutes: 60, tempC: 40 },
      { minutes: 120, tempC: 40 },
      { minutes: 180, tempC: 20 },
    ];
    expect(equivalentMinutes(profile, C1074)).toBeCloseTo(388.9699663, 5);
  });

  it('equals the published C1074 form evaluated term by term (ASTM C1074 equivalent age)', () => {
    const profile = [
      { minutes: 0, tempC: 25 },
      { minutes: 15, tempC: 70 },
      { minutes: 40, tempC: 118 },
      { minutes: 100, tempC: 121 },
      { minutes: 160, tempC: 119 },
      { minutes: 200, tempC: 60 },
    ];
    const params = { activationEnergyKJMol: 75, referenceC: 120 };
    const q = 75000 / 8.314462618;
    let te = 0;
    for (let i = 1; i < profile.length; i++) {
      const a = profile[i - 1]!;
      const b = profile[i]!;
      const ta = (a.tempC + b.tempC) / 2 + 273.15;
      te += Math.exp(-q * (1 / ta - 1 / (120 + 273.15))) * (b.minutes - a.minutes);
    }
    expect(equivalentMinutes(profile, params)).toBeCloseTo(te, 10);
  });

  it('isothermal at the reference gives the elapsed time; Ea 0 gives elapsed time at any temperature', () => {
    expect(
      equivalentMinutes(
        [
          { minutes: 0, tempC: 120 },
          { minutes: 90, tempC: 120 },
        ],
        { activationEnergyKJMol: 80, referenceC: 120 },
      ),
    ).toBeCloseTo(90, 12);
    expect(
      equivalentMinutes(
        [
          { minutes: 0, tempC: 25 },
          { minutes: 90, tempC: 300 },
        ],
        { activationEnergyKJMol: 0, referenceC: 120 },
      ),
    ).toBeCloseTo(90, 12);
  });

  it('refuses decreasing minutes and single points', () => {
    expect(() =>
      equivalentMinutes(
        [
          { minutes: 10, tempC: 100 },
          { minutes: 5, tempC: 100 },
        ],
        C1074,
      ),
    ).toThrow(RangeError);
    expect(() => equivalentMinutes([{ minutes: 0, tempC: 100 }], C1074)).toThrow(RangeError);
  });
});

describe('minutesAtOrAbove — linear interpolation of crossings (hand-computed)', () => {
  const cases = [
    {
      name: 'ramp 0→100 °C over 10 min, threshold 50',
      profile: [
        [0, 0],
        [10, 100],
      ],
      threshold: 50,
      expected: 5,
    },
    {
      name: 'up, hold, down',
      profile: [
        [0, 20],
        [20, 120],
        [80, 120],
        [100, 20],
      ],
      threshold: 110,
      expected: 2 + 60 + 2,
    },
    {
      name: 'exactly at threshold counts',
      profile: [
        [0, 110],
        [30, 110],
      ],
      threshold: 110,
      expected: 30,
    },
    {
      name: 'never reached',
      profile: [
        [0, 20],
        [30, 100],
      ],
      threshold: 110,
      expected: 0,
    },
  ];
  for (const c of cases) {
    it(`${c.name} → ${c.expected} min`, () => {
      const profile = c.profile.map(([minutes, tempC]) => ({ minutes: minutes!, tempC: tempC! }));
      expect(minutesAtOrAbove(profile, c.threshold)).toBeCloseTo(c.expected, 10);
    });
  }
});

describe('cureEquivalent — the endpoint function with its schema', () => {
  it('returns exactly the contract fields', () => {
    const body = CureEquivalentInputSchema.parse({
      profile: [
        { minutes: 0, tempC: 20 },
        { minutes: 60, tempC: 40 },
        { minutes: 120, tempC: 40 },
        { minutes: 180, tempC: 20 },
      ],
      activationEnergyKJMol: EA_Q5000,
      referenceC: 20,
      thresholdC: 30,
    });
    const r = cureEquivalent(body);
    expect(r.equivalentMinutes).toBeCloseTo(388.9699663, 5);
    expect(r.minutesAtOrAbove).toBeCloseTo(30 + 60 + 30, 10); // hand-computed crossings at 30 and 150 min
  });
});

describe('activation energy for equivalent schedules', () => {
  it('60 min at 120 °C ≡ 120 min at 110 °C → Ea = 86.813 kJ/mol (references.md "≈ 87 kJ/mol near 115 °C", computed)', () => {
    const r = activationEnergyForEquivalence({ minutes: 60, tempC: 120 }, { minutes: 120, tempC: 110 });
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.activationEnergyKJMol).toBeCloseTo(86.813398, 5);
    // Order does not matter.
    const s = activationEnergyForEquivalence({ minutes: 120, tempC: 110 }, { minutes: 60, tempC: 120 });
    if (s.ok && r.ok) expect(s.activationEnergyKJMol).toBeCloseTo(r.activationEnergyKJMol, 10);
  });

  it('the solved Ea makes the two schedules equal in equivalent minutes (round trip)', () => {
    const r = activationEnergyForEquivalence({ minutes: 45, tempC: 130 }, { minutes: 180, tempC: 105 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const p = { activationEnergyKJMol: r.activationEnergyKJMol, referenceC: 115 };
    const a = equivalentMinutes(
      [
        { minutes: 0, tempC: 130 },
        { minutes: 45, tempC: 130 },
      ],
      p,
    );
    const b = equivalentMinutes(
      [
        { minutes: 0, tempC: 105 },
        { minutes: 180, tempC: 105 },
      ],
      p,
    );
    expect(a).toBeCloseTo(b, 8);
  });

  it('refuses impossible pairs', () => {
    expect(activationEnergyForEquivalence({ minutes: 60, tempC: 120 }, { minutes: 30, tempC: 110 }).ok).toBe(false);
    expect(activationEnergyForEquivalence({ minutes: 60, tempC: 120 }, { minutes: 90, tempC: 120 }).ok).toBe(false);
  });

  it('bisection on two isothermal profiles agrees with the closed form', () => {
    const r = activationEnergyForProfiles(
      [
        { minutes: 0, tempC: 120 },
        { minutes: 60, tempC: 120 },
      ],
      [
        { minutes: 0, tempC: 110 },
        { minutes: 120, tempC: 110 },
      ],
    );
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.activationEnergyKJMol).toBeCloseTo(86.813398, 4);
  });

  it('bisection on two ramped profiles makes them equivalent', () => {
    const a = [
      { minutes: 0, tempC: 25 },
      { minutes: 30, tempC: 125 },
      { minutes: 75, tempC: 125 },
    ];
    const b = [
      { minutes: 0, tempC: 25 },
      { minutes: 20, tempC: 105 },
      { minutes: 185, tempC: 105 },
    ];
    const r = activationEnergyForProfiles(a, b);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const p = { activationEnergyKJMol: r.activationEnergyKJMol, referenceC: 120 };
    expect(equivalentMinutes(a, p) / equivalentMinutes(b, p)).toBeCloseTo(1, 6);
  });

  it('schema: two schedules with equal temperature are rejected at scheduleB.tempC', () => {
    const r = ActivationEnergyInputSchema.safeParse({
      scheduleA: { minutes: 60, tempC: 120 },
      scheduleB: { minutes: 90, tempC: 120 },
    });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.path).toEqual(['scheduleB', 'tempC']);
  });
});

// ---------------------------------------------------------------------------------------------
// Cure record

const T0 = Date.UTC(2024, 2, 4, 6, 0, 0);
const MIN = 60_000;
const WINDOW: CureWindow = {
  minTempC: 110,
  minEquivalentMinutes: 60,
  referenceC: 120,
  activationEnergyKJMol: 80,
  maxPartTempC: 130,
  maxRampCPerMin: 5,
  maxGapSeconds: 120,
};

/** A piecewise-linear oven profile sampled every 30 s: [minute, °C] corners. */
function sample(corners: [number, number][], everySeconds = 30, offsets: number[] = [0]): OvenReading[] {
  const out: OvenReading[] = [];
  const end = corners[corners.length - 1]![0];
  for (let s = 0; s <= end * 60; s += everySeconds) {
    const m = s / 60;
    let k = 0;
    while (k < corners.length - 2 && corners[k + 1]![0] < m) k++;
    const [m0, t0] = corners[k]!;
    const [m1, t1] = corners[k + 1]!;
    const t = t0 + ((t1 - t0) * (m - m0)) / (m1 - m0);
    out.push({ tMs: T0 + s * 1000, tempC: offsets.length === 1 ? t + offsets[0]! : offsets.map((o) => t + o) });
  }
  return out;
}

// Ramp 25 → 120 °C in 40 min (2.375 °C/min), soak 60 min at 120 °C, cool to 40 °C in 40 min.
const GOOD: [number, number][] = [
  [0, 25],
  [40, 120],
  [100, 120],
  [140, 40],
];

describe('cureRecord', () => {
  it('a good load is complete; numbers agree with hand computation', () => {
    const r = cureRecord({ readings: sample(GOOD), window: WINDOW });
    expect(r.verdict).toBe('complete');
    expect(r.gaps).toEqual([]);
    // Time ≥ 110 °C: crossing up at 40·(85/95) = 35.789 min, down at 100 + 40·(10/80) = 105 min → 69.2105 min.
    expect(r.minutesAtOrAboveMin).toBeCloseTo(105 - (40 * 85) / 95, 6);
    expect(r.peakC).toBeCloseTo(120, 9);
    expect(r.maxHeatUpCPerMin).toBeCloseTo(95 / 40, 6);
    expect(r.maxCoolDownCPerMin).toBeCloseTo(80 / 40, 6);
    expect(r.rampExceeded).toBe(false);
    // The soak alone contributes 60 equivalent minutes at the 120 °C reference; the ramps add
    // only their part at or above the 110 °C minimum (datum temperature).
    expect(r.equivalentMinutes).toBeGreaterThan(60);
    expect(r.equivalentMinutes).toBeCloseTo(
      equivalentMinutes(
        sample(GOOD).map((x) => ({ minutes: (x.tMs - T0) / MIN, tempC: x.tempC as number })),
        WINDOW,
        undefined,
        WINDOW.minTempC,
      ),
      9,
    );
    expect(r.soak?.startMs).toBeCloseTo(T0 + ((40 * 85) / 95) * MIN, -1);
    expect(r.reasons[0]).toMatch(/equivalent minutes/);
  });

  it('uses the coldest thermocouple for cure and the hottest for the peak', () => {
    const r = cureRecord({ readings: sample(GOOD, 30, [-3, 0, 12]), window: WINDOW });
    expect(r.peakC).toBeCloseTo(132, 9);
    expect(r.verdict).toBe('over-temperature');
    const cold = cureRecord({ readings: sample(GOOD, 30, [-3]), window: WINDOW });
    expect(r.equivalentMinutes).toBeCloseTo(cold.equivalentMinutes, 9);
    expect(r.minutesAtOrAboveMin).toBeCloseTo(cold.minutesAtOrAboveMin, 9);
  });

  it('a gap during the soak makes the load unverifiable, whatever else', () => {
    const readings = sample(GOOD).filter((x) => {
      const m = (x.tMs - T0) / MIN;
      return m <= 60 || m >= 70; // 10 min without data in the soak
    });
    const r = cureRecord({ readings, window: WINDOW });
    expect(r.verdict).toBe('unverifiable');
    expect(r.gaps).toHaveLength(1);
    expect(r.gaps[0]).toEqual({ startMs: T0 + 60 * MIN, endMs: T0 + 70 * MIN, durationS: 600 });
    expect(r.reasons[0]).toMatch(/during the soak/);
    // The gap interval does not count: 10 fewer minutes at temperature than the good load.
    const good = cureRecord({ readings: sample(GOOD), window: WINDOW });
    expect(good.minutesAtOrAboveMin - r.minutesAtOrAboveMin).toBeCloseTo(10, 6);
    expect(good.equivalentMinutes - r.equivalentMinutes).toBeCloseTo(10, 6); // at the reference temperature
  });

  it('a gap before the soak does not block the verdict but is left out of the sums', () => {
    const readings = sample(GOOD).filter((x) => {
      const m = (x.tMs - T0) / MIN;
      return m <= 5 || m >= 10;
    });
    const r = cureRecord({ readings, window: WINDOW });
    expect(r.gaps).toHaveLength(1);
    expect(r.verdict).toBe('complete');
    expect(r.reasons.join(' ')).toMatch(/outside the soak/);
  });

  it('missing data at the end of the load while still hot is a gap that overlaps the soak', () => {
    const readings = sample(GOOD).filter((x) => (x.tMs - T0) / MIN <= 90);
    const r = cureRecord({ readings, window: WINDOW, loadStartMs: T0, loadEndMs: T0 + 140 * MIN });
    expect(r.verdict).toBe('unverifiable');
  });

  it('over-temperature when the peak exceeds the part limit', () => {
    const r = cureRecord({
      readings: sample([
        [0, 25],
        [40, 135],
        [100, 135],
        [140, 40],
      ]),
      window: WINDOW,
    });
    expect(r.verdict).toBe('over-temperature');
    expect(r.reasons[0]).toMatch(/above the 130 °C limit/);
  });

  it('under-cured when the equivalent minutes fall short', () => {
    const r = cureRecord({
      readings: sample([
        [0, 25],
        [40, 120],
        [60, 120],
        [100, 40],
      ]),
      window: WINDOW,
    });
    expect(r.verdict).toBe('under-cured');
    expect(r.equivalentMinutes).toBeLessThan(60);
    expect(r.reasons[0]).toMatch(/needs 60/);
  });

  it('flags a ramp faster than allowed (over the 2-minute smoothing span)', () => {
    const r = cureRecord({
      readings: sample([
        [0, 25],
        [10, 120],
        [80, 120],
        [120, 40],
      ]),
      window: WINDOW,
    });
    expect(r.maxHeatUpCPerMin).toBeCloseTo(9.5, 6);
    expect(r.rampExceeded).toBe(true);
    expect(r.reasons.join(' ')).toMatch(/Ramp rate above/);
  });

  it('counts door openings and their duration, closing one left open at the end', () => {
    const r = cureRecord({
      readings: sample(GOOD),
      window: WINDOW,
      doorEvents: [
        { tMs: T0 + 2 * MIN, open: true },
        { tMs: T0 + 3 * MIN, open: false },
        { tMs: T0 + 70 * MIN, open: true },
        { tMs: T0 + 70.5 * MIN, open: false },
        { tMs: T0 + 139 * MIN, open: true },
      ],
    });
    expect(r.door.openings).toBe(3);
    expect(r.door.openSeconds).toBeCloseTo(60 + 30 + 60, 9);
    expect(r.door.openingsDuringSoak).toBe(1);
    expect(r.door.events[2]?.stillOpen).toBe(true);
  });

  it('unverifiable without data', () => {
    expect(cureRecord({ readings: [], window: WINDOW }).verdict).toBe('unverifiable');
  });
});

describe('ovenLoadPhase', () => {
  const readings = sample(GOOD);
  const upTo = (m: number) => readings.filter((x) => x.tMs <= T0 + m * MIN);
  const cases = [
    { at: 20, setpoint: 120, phase: 'ramp' },
    { at: 70, setpoint: 120, phase: 'soak' },
    { at: 120, setpoint: 25, phase: 'cool' },
    { at: 140, setpoint: null, phase: 'idle' },
  ] as const;
  for (const c of cases) {
    it(`minute ${c.at}, setpoint ${c.setpoint} → ${c.phase}`, () => {
      expect(ovenLoadPhase({ setpointC: c.setpoint, readings: upTo(c.at), soakMinutesRequired: 60 }).phase).toBe(c.phase);
    });
  }
  it('soak start is where the reading entered the ±5 °C band; end = start + required minutes', () => {
    const p = ovenLoadPhase({ setpointC: 120, readings: upTo(70), soakMinutesRequired: 60 });
    // Band entry at 115 °C: 40·(90/95) = 37.89 min → first sample at or after it is 38.0 min.
    expect(p.soakStartMs).toBe(T0 + 38 * MIN);
    expect(p.predictedEndMs).toBe(T0 + 98 * MIN);
  });
});
