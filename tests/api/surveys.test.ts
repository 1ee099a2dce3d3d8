/**
 * Oven temperature-uniformity surveys through the API on constructed survey files: the
 * stabilised soak (automatic: every sensor ≥ setpoint − 2 °C, then 10 min — common practice —
 * or chosen), hottest and coldest deviation, the class from the SAE AMS2750F Table 11 furnace-class table
 * (class 1 ±3 °C, 2 ±6, 3 ±8, 4 ±10, 5 ±14, 6 ±28 °C; a deviation equal to a tolerance is
 * inside it), calibration corrections, malformed files, and the overdue warning.
 */
import type pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { createTestOven, type TestOven } from '../support/trace-fixtures.ts';

let pool: pg.Pool;
let oven: TestOven;
let engineer: Session;
let quality: Session;
let viewer: Session;
const T0 = Date.parse('2026-06-01T08:00:00Z');

/**
 * Three sensors, one row a minute for 40 minutes: each heats 24 → its plateau at 8 °C/min
 * (A 111.5, B 108.5, C 110.2 °C); A reads 118 °C at minute 12 (an overshoot before the soak).
 * All three are ≥ 108 °C (setpoint 110 − 2) first at minute 11 (B: 24 + 8·11 = 112 → capped at 108.5).
 */
function surveyCsv(): string {
  const plateau = { A: 111.5, B: 108.5, C: 110.2 };
  const lines = ['time,A,B,C'];
  for (let m = 0; m <= 40; m++) {
    const v = (p: number) => Math.min(p, 24 + 8 * m);
    const a = m === 12 ? 118 : v(plateau.A);
    lines.push(
      `${new Date(T0 + m * 60_000).toISOString()},${a.toFixed(1)},${v(plateau.B).toFixed(1)},${v(plateau.C).toFixed(1)}`,
    );
  }
  return lines.join('\n');
}

beforeAll(async () => {
  pool = testPool();
  oven = await createTestOven(pool);
  engineer = await signIn('engineer');
  quality = await signIn('quality');
  viewer = await signIn('viewer');
});

afterAll(async () => {
  await api('/api/v1/surveys/settings', {
    method: 'PUT',
    session: engineer,
    json: {
      intervalDays: 90,
      classTableName: 'SAE AMS2750F furnace classes (Table 11)',
      classTable: [1, 2, 3, 4, 5, 6].map((c, i) => ({ class: c, toleranceC: [3, 6, 8, 10, 14, 28][i] })),
    },
  });
  await closeTestPool();
});

describe('uniformity survey', () => {
  it('automatic stabilisation leaves the overshoot out: ±1.5 °C → class 1 (AMS2750F ±3 °C)', async () => {
    const r = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv() },
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    // Hand-computed: every sensor ≥ 108 °C first at minute 11 (B reaches 108.5 there), + 10 min → from minute 21.
    expect(r.body.stabilisedFromMinutes).toBe(21);
    expect(r.body.result.hottestDeviationC).toBeCloseTo(1.5, 12);
    expect(r.body.result.coldestDeviationC).toBeCloseTo(-1.5, 12);
    expect(r.body.result).toMatchObject({ hottestSensor: 'A', coldestSensor: 'B', uniformityClass: 1, classToleranceC: 3 });
  });

  it('a chosen start that takes in the overshoot: +8 °C → class 3, on its ±8 °C edge', async () => {
    const r = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv(), stabilisedFromMinutes: 12 },
    });
    expect(r.body.result.hottestDeviationC).toBeCloseTo(8, 12);
    expect(r.body.result.uniformityClass).toBe(3);
  });

  it('calibration corrections are added to every reading of their sensor', async () => {
    const r = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv(), corrections: { B: 0.5 } },
    });
    expect(r.body.result.coldestDeviationC).toBeCloseTo(-1.0, 12);
    const unknown = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv(), corrections: { Z: 1 } },
    });
    expect(unknown.status).toBe(400);
    expect(unknown.body.errors[0].path).toBe('corrections');
  });

  it('bad files are refused with their line numbers; a soak that never settles is a 422', async () => {
    const bad = surveyCsv().replace(/\n(2026-06-01T08:05:00.000Z),[^,]+,/, '\n$1,hot,');
    const r = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: bad },
    });
    expect(r.status).toBe(400);
    expect(r.body.errors[0]).toMatchObject({ path: 'csv' });
    expect(r.body.errors[0].message).toContain('line 7');
    const noTime = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: 'when,A\n1,2\n3,4\n' },
    });
    expect(noTime.status).toBe(400);
    expect(noTime.body.errors[0].message).toContain('line 1');
    const never = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 150, csv: surveyCsv() },
    });
    expect(never.status).toBe(422);
    const zone = (await pool.query<{ id: number }>('select id from assets where code = $1', [`${oven.code}-z1`])).rows[0]!.id;
    const notOven = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: zone, setpointC: 110, csv: surveyCsv() },
    });
    expect(notOven.status).toBe(400);
    const operator = await signIn('operator');
    expect(
      (
        await api('/api/v1/surveys/preview', {
          method: 'POST',
          session: operator,
          json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv() },
        })
      ).status,
    ).toBe(403);
  });

  it('a stored survey keeps its file; an oven whose last survey is older than the interval is overdue', async () => {
    const saved = await api('/api/v1/surveys', {
      method: 'POST',
      session: engineer,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv(), fileName: 'oven-survey.csv' },
    });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const one = await api(`/api/v1/surveys/${saved.body.id}`, { session: viewer });
    expect(one.body).toMatchObject({
      ovenAssetId: oven.id,
      uniformityClass: 1,
      classTableName: 'SAE AMS2750F furnace classes (Table 11)',
      stabilisedAuto: true,
    });
    expect(one.body.surveyedAt).toBe('2026-06-01T08:00:00.000Z');
    expect(one.body.fileId).toEqual(expect.any(Number));
    const list = await api('/api/v1/surveys', { session: viewer });
    const status = list.body.status.ovens.find((x: { ovenAssetId: number }) => x.ovenAssetId === oven.id);
    // Surveyed 2026-06-01; the default interval is 90 days (common practice) → due 2026-08-30.
    expect(status.dueAt).toBe('2026-08-30T08:00:00.000Z');
    expect(status.overdue).toBe(Date.now() > Date.parse('2026-08-30T08:00:00.000Z'));
  });

  it('the class table and interval are the engineer’s settings', async () => {
    const dup = await api('/api/v1/surveys/settings', {
      method: 'PUT',
      session: engineer,
      json: {
        intervalDays: 30,
        classTableName: 'x',
        classTable: [
          { class: 1, toleranceC: 3 },
          { class: 1, toleranceC: 5 },
        ],
      },
    });
    expect(dup.status).toBe(400);
    expect(dup.body.errors[0].path).toBe('classTable.1.class');
    expect(
      (
        await api('/api/v1/surveys/settings', {
          method: 'PUT',
          session: quality,
          json: { intervalDays: 30, classTableName: 'x', classTable: [{ class: 1, toleranceC: 3 }] },
        })
      ).status,
    ).toBe(403);
    // AMS2750F (the earlier revision) has class 2 at ±5 °C: a ±4 °C survey is then class 2.
    const f = await api('/api/v1/surveys/settings', {
      method: 'PUT',
      session: engineer,
      json: {
        intervalDays: 400,
        classTableName: 'SAE AMS2750F furnace classes',
        classTable: [
          { class: 1, toleranceC: 3 },
          { class: 2, toleranceC: 5 },
          { class: 3, toleranceC: 7 },
        ],
      },
    });
    expect(f.status).toBe(200);
    const r = await api('/api/v1/surveys/preview', {
      method: 'POST',
      session: quality,
      json: { ovenAssetId: oven.id, setpointC: 110, csv: surveyCsv(), corrections: { A: 2.5 } },
    });
    // Hand-computed: A plateau 111.5 + 2.5 = 114 → +4 °C → class 2 (±5 °C) in the F table.
    expect(r.body.result).toMatchObject({ uniformityClass: 2, classToleranceC: 5 });
    expect(r.body.classTableName).toBe('SAE AMS2750F furnace classes');
  });
});
