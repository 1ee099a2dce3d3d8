/**
 * Gauges and measurement-system studies through the running app: a gauge R&R study of the AIAG
 * MSA 4th ed. example data stored and read back (variance components as the manual's example
 * gives them, via McNeese 2015), its audit row, the calculators, the characteristic link and the
 * capability report's warning, and bad input → 4xx problem+json with the field path.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { api, signIn, type Session } from '../support/http.ts';

let pool: pg.Pool;
let engineer: Session;
let quality: Session;
let operator: Session;
let viewer: Session;
const tag = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;

// AIAG MSA 4th ed. GRR example: appraiser → trials → parts 1–10.
const AIAG: Record<string, number[][]> = {
  A: [
    [0.29, -0.56, 1.34, 0.47, -0.8, 0.02, 0.59, -0.31, 2.26, -1.36],
    [0.41, -0.68, 1.17, 0.5, -0.92, -0.11, 0.75, -0.2, 1.99, -1.25],
    [0.64, -0.58, 1.27, 0.64, -0.84, -0.21, 0.66, -0.17, 2.01, -1.31],
  ],
  B: [
    [0.08, -0.47, 1.19, 0.01, -0.56, -0.2, 0.47, -0.63, 1.8, -1.68],
    [0.25, -1.22, 0.94, 1.03, -1.2, 0.22, 0.55, 0.08, 2.12, -1.62],
    [0.07, -0.68, 1.34, 0.2, -1.28, 0.06, 0.83, -0.34, 2.19, -1.5],
  ],
  C: [
    [0.04, -1.38, 0.88, 0.14, -1.46, -0.29, 0.02, -0.46, 1.77, -1.49],
    [-0.11, -1.13, 1.09, 0.2, -1.07, -0.67, 0.01, -0.56, 1.45, -1.77],
    [-0.15, -0.96, 0.67, 0.11, -1.45, -0.49, 0.21, -0.49, 1.87, -2.16],
  ],
};
const readings = Object.entries(AIAG).flatMap(([appraiser, trials]) =>
  trials.flatMap((row, t) => row.map((value, p) => ({ appraiser, part: p + 1, trial: t + 1, value }))),
);

function expectProblem(r: { status: number; headers: Headers; body: any }, status: number, path?: string) {
  expect(r.status).toBe(status);
  expect(r.headers.get('content-type')).toContain('application/problem+json');
  if (path) expect(r.body.errors.map((e: any) => e.path)).toContain(path);
}

let gaugeId = 0;
let characteristicId = 0;

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  engineer = await signIn('engineer');
  quality = await signIn('quality');
  operator = await signIn('operator');
  viewer = await signIn('viewer');
  const { rows } = await pool.query<{ id: number }>('select id from characteristics order by id limit 1');
  characteristicId = rows[0]!.id;
});

afterAll(async () => {
  await pool.query('delete from characteristic_gauges where characteristic_id = $1', [characteristicId]);
  await pool.end();
});

describe('gauges and studies', () => {
  it('registers a gauge (quality); an operator may not; a duplicate name is a 409', async () => {
    const body = { name: `Thickness gauge ${tag}`, kind: 'thickness', unit: 'µm' };
    const r = await api('/api/v1/gauges', { method: 'POST', session: quality, json: body });
    expect(r.status).toBe(201);
    gaugeId = r.body.id;
    expect(r.body.grrStatus).toBeNull();
    expect((await api('/api/v1/gauges', { method: 'POST', session: operator, json: body })).status).toBe(403);
    expectProblem(await api('/api/v1/gauges', { method: 'POST', session: quality, json: body }), 409, 'name');
    expectProblem(
      await api('/api/v1/gauges', { method: 'POST', session: quality, json: { ...body, kind: 'ruler' } }),
      400,
      'kind',
    );
  });

  it('a linked characteristic without an acceptable study carries the warning', async () => {
    const put = await api(`/api/v1/characteristics/${characteristicId}/gauge`, {
      method: 'PUT',
      session: engineer,
      json: { gaugeId },
    });
    expect(put.status).toBe(200);
    const s = await api(`/api/v1/characteristics/${characteristicId}/gauge`, { session: viewer });
    expect(s.body.gauge.id).toBe(gaugeId);
    expect(s.body.warning).toMatch(/no gauge R&R study/);
    const page = await api(`/charts/control/${characteristicId}/capability`, { session: viewer });
    expect(page.status).toBe(200);
    expect(String(page.body)).toContain('data-gauge-warning');
    expect(String(page.body)).toContain('has no gauge R&amp;R study');
  });

  it('stores the AIAG example by ANOVA: σ² EV 0.0400, AV 0.0515, PV 1.086, ndc 4 → unacceptable; audited', async () => {
    const r = await api('/api/v1/gauges/studies', {
      method: 'POST',
      session: engineer,
      json: { kind: 'grr', method: 'anova', gaugeId, title: `AIAG example ${tag}`, readings },
    });
    expect(r.status).toBe(201);
    expect(r.body.verdict).toBe('unacceptable');
    const g = r.body.result.grr;
    expect(g.repeatability.variance).toBeCloseTo(0.04, 4);
    expect(g.reproducibility.variance).toBeCloseTo(0.0515, 4);
    expect(g.partVariation.variance).toBeCloseTo(1.086, 3);
    expect(g.ndc).toBe(4);
    const back = await api(`/api/v1/gauges/studies/${r.body.id}`, { session: viewer });
    expect(back.status).toBe(200);
    expect(back.body.data.readings).toHaveLength(90);
    const audit = await pool.query(`select action from audit_log where entity = 'gauge_study' and entity_id = $1`, [
      String(r.body.id),
    ]);
    expect(audit.rows.map((x) => x.action)).toEqual(['gauge.study']);
    const page = await api(`/gauges/studies/${r.body.id}`, { session: viewer });
    expect(page.status).toBe(200);
    expect(String(page.body)).toContain('unacceptable');
  });

  it('the warning names the unacceptable study; with a tolerance-free acceptable study it clears', async () => {
    let s = await api(`/api/v1/characteristics/${characteristicId}/gauge`, { session: viewer });
    expect(s.body.warning).toMatch(/unacceptable/);
    // Same parts, a tighter gauge: the readings pulled to their part means (invented, 10 % of the spread kept).
    const partMean = (p: number) => readings.filter((x) => x.part === p).reduce((a, x) => a + x.value, 0) / 9;
    const tight = readings.map((x) => ({ ...x, value: partMean(x.part) + 0.1 * (x.value - partMean(x.part)) }));
    const r = await api('/api/v1/gauges/studies', {
      method: 'POST',
      session: engineer,
      json: { kind: 'grr', method: 'average-range', gaugeId, title: `after repair ${tag}`, readings: tight },
    });
    expect(r.status).toBe(201);
    expect(r.body.verdict).toBe('acceptable');
    s = await api(`/api/v1/characteristics/${characteristicId}/gauge`, { session: viewer });
    expect(s.body.warning).toBeNull();
    const list = await api('/api/v1/gauges', { session: viewer });
    expect(list.body.gauges.find((x: any) => x.id === gaugeId).grrStatus).toBe('acceptable');
  });

  it('an unbalanced study is a 422 naming readings; an unknown gauge a 404', async () => {
    const r = await api('/api/v1/gauges/studies', {
      method: 'POST',
      session: engineer,
      json: { kind: 'grr', method: 'anova', gaugeId, title: 'holes', readings: readings.slice(1) },
    });
    expectProblem(r, 422, 'readings');
    const r2 = await api('/api/v1/gauges/studies', {
      method: 'POST',
      session: engineer,
      json: { kind: 'grr', method: 'anova', gaugeId: 2147483000, title: 'nobody', readings },
    });
    expect(r2.status).toBe(404);
  });
});

describe('MSA calculators (any signed-in role)', () => {
  it('gauge-rr by average and range: %GRR 26.7, ndc 5 as the AIAG example prints', async () => {
    const r = await api('/api/v1/calc/gauge-rr', {
      method: 'POST',
      session: viewer,
      json: { method: 'average-range', readings },
    });
    expect(r.status).toBe(200);
    expect(r.body.grr.grr.pctTotalVariation).toBeCloseTo(26.7, 1);
    expect(r.body.grr.ndc).toBe(5);
    expect(r.body.verdict).toBe('conditional');
  });
  it('gauge-bias: AIAG Table III-B 1 → bias 0.0067, acceptable', async () => {
    const r = await api('/api/v1/calc/gauge-bias', {
      method: 'POST',
      session: operator,
      json: { reference: 6, readings: [5.8, 5.7, 5.9, 5.9, 6.0, 6.1, 6.0, 6.1, 6.4, 6.3, 6.0, 6.1, 6.2, 5.6, 6.0] },
    });
    expect(r.status).toBe(200);
    expect(r.body.bias.bias).toBeCloseTo(0.0067, 4);
    expect(r.body.verdict).toBe('acceptable');
  });
  it('gauge-linearity: a bias proportional to the reference is unacceptable (slope 0.1 exactly)', async () => {
    const points = [1, 2, 3, 4, 5].flatMap((ref) => [-0.01, 0.01].map((e) => ({ reference: ref, reading: ref * 1.1 + e })));
    const r = await api('/api/v1/calc/gauge-linearity', { method: 'POST', session: viewer, json: { points } });
    expect(r.status).toBe(200);
    expect(r.body.linearity.slope).toBeCloseTo(0.1, 10);
    expect(r.body.verdict).toBe('unacceptable');
  });
  it('bad input is a 400 with the field path', async () => {
    expectProblem(
      await api('/api/v1/calc/gauge-rr', { method: 'POST', session: viewer, json: { readings: [] } }),
      400,
      'readings',
    );
    expectProblem(
      await api('/api/v1/calc/gauge-bias', { method: 'POST', session: viewer, json: { reference: 'x', readings: [1, 2] } }),
      400,
      'reference',
    );
  });
});

describe('POST /api/v1/calc/dew-point', () => {
  it('22 °C, 55 % RH: dew point 12.55 °C (Magnus, Alduchov & Eskridge 1996: 243.04·γ/(17.625 − γ)); a 14 °C surface is at risk', async () => {
    const g = Math.log(0.55) + (17.625 * 22) / (243.04 + 22);
    const r = await api('/api/v1/calc/dew-point', {
      method: 'POST',
      session: viewer,
      json: { airC: 22, rhPct: 55, surfaceC: 14 },
    });
    expect(r.status).toBe(200);
    expect(r.body.dewPointC).toBeCloseTo((243.04 * g) / (17.625 - g), 10);
    expect(r.body.dewPointC).toBeCloseTo(12.55, 2);
    expect(r.body.blush.risk).toBe('at-risk');
  });
  it('RH above 100 % is a 400 on rhPct', async () => {
    expectProblem(
      await api('/api/v1/calc/dew-point', { method: 'POST', session: viewer, json: { airC: 22, rhPct: 120 } }),
      400,
      'rhPct',
    );
  });
});
