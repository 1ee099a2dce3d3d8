/**
 * `POST /api/v1/calc/cure-verdict` (product.md §6) through the running app: the answer is the
 * oven-load record's own verdict (checked against the domain's cureRecord on the same data),
 * the review's W2 counter-example is under-cured, each other verdict is reachable, and bad input
 * is a 4xx problem with field paths (never a 500).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { cureRecord } from '../../src/lib/domain/cure/cure-record.ts';
import { CURE_VERDICT_MAX_READINGS } from '../../src/lib/shared/calc.ts';
import { api, signIn, type Session } from '../support/http.ts';

let viewer: Session;
let operator: Session;
beforeAll(async () => {
  viewer = await signIn('viewer');
  operator = await signIn('operator');
});

const post = (json: unknown, session: Session = viewer) => api('/api/v1/calc/cure-verdict', { method: 'POST', session, json });

function expectProblem(r: { status: number; headers: Headers; body: any }, status: number, path?: string) {
  expect(r.status).toBe(status);
  expect(r.headers.get('content-type')).toContain('application/problem+json');
  if (path) expect(r.body.errors.map((e: any) => e.path)).toContain(path);
}

/** Window of the demo's example lacquer (seeds/windows.ts): ≥ 100 °C, 150 min at 110 °C, 75 kJ/mol. */
const WINDOW = {
  minTempC: 100,
  minEquivalentMinutes: 150,
  referenceC: 110,
  activationEnergyKJMol: 75,
  maxPartTempC: 125,
  maxRampCPerMin: 5,
  maxGapSeconds: 120,
};

/** Piecewise-linear profile sampled every `step` minutes. */
function profile(corners: [number, number][], step = 0.5): { minutes: number; tempC: number }[] {
  const out: { minutes: number; tempC: number }[] = [];
  const end = corners[corners.length - 1]![0];
  for (let m = 0; m <= end + 1e-9; m += step) {
    let k = 0;
    while (k < corners.length - 2 && corners[k + 1]![0] < m) k++;
    const [m0, a] = corners[k]!;
    const [m1, b] = corners[k + 1]!;
    out.push({ minutes: m, tempC: a + ((b - a) * (m - m0)) / (m1 - m0) });
  }
  return out;
}

describe('POST /api/v1/calc/cure-verdict', () => {
  it('a 180-minute soak at 110 °C is complete; the answer is the load record’s (domain cureRecord on the same readings)', async () => {
    const readings = profile([
      [0, 25],
      [30, 110],
      [210, 110],
      [240, 60],
    ]);
    const r = await post({ readings, window: WINDOW });
    expect(r.status).toBe(200);
    expect(Object.keys(r.body).sort()).toEqual(['equivalentMinutes', 'minutesAtOrAbove', 'peakC', 'reasons', 'verdict']);
    expect(r.body.verdict).toBe('complete');
    const rec = cureRecord({ readings: readings.map((x) => ({ tMs: x.minutes * 60_000, tempC: x.tempC })), window: WINDOW });
    expect(r.body.equivalentMinutes).toBeCloseTo(rec.equivalentMinutes, 9);
    expect(r.body.minutesAtOrAbove).toBeCloseTo(rec.minutesAtOrAboveMin, 9);
    expect(r.body.reasons).toEqual(rec.reasons);
    // Hand geometry: 100 °C is crossed at 30·75/85 = 26.47 min on the way up and 210 + 30·10/50 = 216 min down.
    expect(r.body.minutesAtOrAbove).toBeCloseTo(216 - (30 * 75) / 85, 6);
    expect(r.body.peakC).toBe(110);
    // At least the 180 min held at the 110 °C reference count 1:1 (ASTM C1074 factor 1 at T_ref).
    expect(r.body.equivalentMinutes).toBeGreaterThan(180);
  });

  it('review W2: ramp to 108 °C and hold 150 min against a 110 °C minimum is under-cured with 0 equivalent minutes', async () => {
    const readings = profile([
      [0, 25],
      [30, 108],
      [180, 108],
      [210, 40],
    ]);
    const r = await post(
      {
        readings,
        window: {
          ...WINDOW,
          minTempC: 110,
          referenceC: 120,
          activationEnergyKJMol: 80,
          minEquivalentMinutes: 60,
          maxPartTempC: 130,
        },
      },
      operator,
    );
    expect(r.status).toBe(200);
    expect(r.body.verdict).toBe('under-cured');
    expect(r.body.equivalentMinutes).toBe(0);
    expect(r.body.minutesAtOrAbove).toBe(0);
    expect(r.body.reasons[0]).toMatch(/never reached the minimum 110 °C/);
  });

  it('over-temperature above the maximum part temperature; unverifiable with a data gap in the soak', async () => {
    const hot = await post({
      readings: profile([
        [0, 25],
        [30, 128],
        [200, 128],
        [230, 60],
      ]),
      window: WINDOW,
    });
    expect(hot.body.verdict).toBe('over-temperature');
    expect(hot.body.peakC).toBe(128);
    const gappy = profile([
      [0, 25],
      [30, 110],
      [210, 110],
      [240, 60],
    ]).filter((x) => x.minutes <= 90 || x.minutes >= 100);
    const gap = await post({ readings: gappy, window: WINDOW });
    expect(gap.body.verdict).toBe('unverifiable');
    expect(gap.body.reasons[0]).toMatch(/No oven data for 10\.0 min/);
  });

  it('a window soak time longer than the time at or above the minimum is under-cured', async () => {
    const readings = profile([
      [0, 25],
      [20, 120],
      [80, 120],
      [100, 60],
    ]);
    const loose = await post({ readings, window: { ...WINDOW, minEquivalentMinutes: 60 } });
    expect(loose.body.verdict).toBe('complete');
    const strict = await post({ readings, window: { ...WINDOW, minEquivalentMinutes: 60, minSoakMinutes: 90 } });
    expect(strict.body.verdict).toBe('under-cured');
  });

  it('bad input is a 400 problem with the field path', async () => {
    const ok = profile([
      [0, 25],
      [10, 110],
    ]);
    expectProblem(await post({ readings: [{ minutes: 0, tempC: 25 }], window: WINDOW }), 400, 'readings');
    expectProblem(
      await post({
        readings: [
          { minutes: 5, tempC: 25 },
          { minutes: 4, tempC: 30 },
        ],
        window: WINDOW,
      }),
      400,
      'readings.1.minutes',
    );
    expectProblem(await post({ readings: ok, window: { ...WINDOW, maxPartTempC: 90 } }), 400, 'window.maxPartTempC');
    expectProblem(await post({ readings: ok, window: { ...WINDOW, maxGapSeconds: 0 } }), 400, 'window.maxGapSeconds');
    expectProblem(
      await post({ readings: ok, window: { ...WINDOW, activationEnergyKJMol: 'x' } }),
      400,
      'window.activationEnergyKJMol',
    );
    expectProblem(await post({ readings: [{ minutes: 0, tempC: -300 }, ...ok], window: WINDOW }), 400, 'readings.0.tempC');
    expectProblem(await post({ readings: ok }), 400, 'window');
  });

  it(`caps the profile at ${CURE_VERDICT_MAX_READINGS} readings (and takes exactly that many)`, async () => {
    const at = Array.from({ length: CURE_VERDICT_MAX_READINGS }, (_, i) => ({
      minutes: i / 60,
      tempC: i < 3600 ? 25 + i / 40 : 115,
    }));
    const r = await post({ readings: at, window: WINDOW });
    expect(r.status).toBe(200);
    expect(r.body.verdict).toBe('complete');
    const over = [...at, { minutes: CURE_VERDICT_MAX_READINGS / 60, tempC: 115 }];
    expectProblem(await post({ readings: over, window: WINDOW }), 400, 'readings');
  });
});
