/**
 * `POST /api/v1/spc/evaluate` through HTTP: the endpoint's contract against published worked
 * examples (each expected value names its source), and every class of bad input answered with a
 * 400 problem+json that names the offending field.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { api, base, signIn, type Session } from '../support/http.ts';

let viewer: Session;
let operator: Session;
beforeAll(async () => {
  viewer = await signIn('viewer');
  operator = await signIn('operator');
});

const evaluate = (json: unknown, session: Session | null = viewer) =>
  api('/api/v1/spc/evaluate', { method: 'POST', session, json });

/** The problem's field paths. */
const paths = (body: { errors?: { path: string }[] }) => (body.errors ?? []).map((e) => e.path);

describe('published examples through HTTP', () => {
  it('individuals — NIST/SEMATECH e-Handbook §6.3.2.2 flow rates: x̄ 50.81, MR̄ 1.8778, UCL 55.8041, LCL 45.8159, in control', async () => {
    const values = [49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];
    const r = await evaluate({ chart: 'imr', values, rules: ['we1', 'we2', 'we3', 'we4'] });
    expect(r.status).toBe(200);
    expect(r.body.limits.center).toBeCloseTo(50.81, 4);
    expect(r.body.dispersion.center).toBeCloseTo(1.8778, 4);
    // NIST multiplies by 3/1.128 (d2 to 3 dp); the exact d2 moves the limits by 0.0017 → 2 dp.
    expect(r.body.limits.ucl).toBeCloseTo(55.8041, 2);
    expect(r.body.limits.lcl).toBeCloseTo(45.8159, 2);
    expect(r.body.points).toHaveLength(10);
    expect(r.body.points[0]).toMatchObject({ index: 1, value: 49.6, violations: [] });
    expect(typeof r.body.points[0].ucl).toBe('number');
    expect(typeof r.body.points[0].lcl).toBe('number');
    expect(r.body.points.every((p: { violations: string[] }) => p.violations.length === 0)).toBe(true);
    expect(r.body.sigmaWithin).toBeCloseTo(1.8778 / 1.128379, 4);
    expect(r.body.capability).toBeNull();
  });

  it('EWMA — NIST/SEMATECH e-Handbook §6.3.2.4 (target 50, s 2.0539, λ 0.3, L 3): printed z series and asymptotic limits 52.5884 / 47.4115', async () => {
    const values = [
      52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1,
    ];
    const printed = [
      50.6, 49.52, 50.56, 50.18, 50.16, 49.21, 49.75, 49.85, 50.26, 50.33, 50.11, 49.36, 49.52, 50.05, 49.38, 49.92, 50.73, 51.23,
      51.94, 51.99,
    ];
    const r = await evaluate({ chart: 'ewma', values, target: 50, sigma: 2.0539, lambda: 0.3, L: 3, limits: 'asymptotic' });
    expect(r.status).toBe(200);
    printed.forEach((z, i) => expect(r.body.points[i].value).toBeCloseTo(z, 2));
    expect(r.body.limits.ucl).toBeCloseTo(52.5884, 4);
    expect(r.body.limits.lcl).toBeCloseTo(47.4115, 3); // NIST truncates 47.41157
    expect(r.body.points[19]).toMatchObject({ index: 20, violations: [] });
    expect(r.body.points[0].ucl).toBeCloseTo(52.5884, 4);
  });

  it('tabular CUSUM — NIST/SEMATECH e-Handbook §6.3.2.3 (target 325, k 0.3175, h 4.1959 in data units): C⁺ first beyond h at group 14 (4.94), 19.035 at group 20', async () => {
    const means = [
      324.925, 324.675, 324.725, 324.35, 325.35, 325.225, 324.125, 324.525, 325.225, 324.6, 324.625, 325.15, 328.325, 327.25,
      327.825, 328.5, 326.675, 327.775, 326.875, 328.35,
    ];
    // σ of the group means 0.635 (NIST): k = 0.3175/0.635 = 0.5σ, h = 4.1959/0.635σ.
    const r = await evaluate({ chart: 'cusum', values: means, target: 325, sigma: 0.635, k: 0.5, h: 4.1959 / 0.635 });
    expect(r.status).toBe(200);
    expect(r.body.limits.ucl).toBeCloseTo(4.1959, 4);
    expect(r.body.points[12].cPlus).toBeCloseTo(3.0075, 4);
    expect(r.body.points[13].cPlus).toBeCloseTo(4.94, 2);
    const firstSignal = r.body.points.find((p: { violations: string[] }) => p.violations.length > 0);
    expect(firstSignal.index).toBe(14);
    expect(firstSignal.violations).toEqual(['cusum-upper']);
    expect(r.body.points[19].cPlus).toBeCloseTo(19.035, 3);
    expect(typeof r.body.points[0].cMinus).toBe('number');
  });

  it('capability — NIST/SEMATECH e-Handbook §6.1.6 (USL 20, LSL 8, mean 16, σ 2): Cp 1.0, Cpk 0.6667 (Cpu 0.6667, Cpl 1.3333)', async () => {
    // Known σ 2 and data whose mean is exactly 16 (hand-made: 128/8), so the indices are NIST's.
    const values = [13, 19, 16, 15, 17, 14, 18, 16];
    const r = await evaluate({ chart: 'imr', values, target: 16, sigma: 2, spec: { lsl: 8, usl: 20 } });
    expect(r.status).toBe(200);
    const c = r.body.capability;
    expect(c.cp).toBeCloseTo(1.0, 10);
    expect(c.cpk).toBeCloseTo(0.6667, 4);
    expect(c.cpu).toBeCloseTo(0.6667, 4);
    expect(c.cpl).toBeCloseTo(1.3333, 4);
    expect(typeof c.pp).toBe('number');
    expect(typeof c.ppk).toBe('number');
    expect(typeof c.cpm).toBe('number');
    expect(c.cpkInterval.lower).toBeLessThan(c.cpk);
    expect(c.cpkInterval.upper).toBeGreaterThan(c.cpk);
  });

  /**
   * Montgomery, Introduction to SQC, Table 6.1 (6th ed. numbering), hard-bake flow width (µm), 25
   * samples of 5 — the same transcription as tests/domain/spc/charts.test.ts.
   */
  const HARD_BAKE = [
    [1.3235, 1.4128, 1.6744, 1.4573, 1.6914],
    [1.4314, 1.3592, 1.6075, 1.4666, 1.6109],
    [1.4284, 1.4871, 1.4932, 1.4324, 1.5674],
    [1.5028, 1.6352, 1.3841, 1.2831, 1.5507],
    [1.5604, 1.2735, 1.5265, 1.4363, 1.6441],
    [1.5955, 1.5451, 1.3574, 1.3281, 1.4198],
    [1.6274, 1.5064, 1.8366, 1.4177, 1.5144],
    [1.419, 1.4303, 1.6637, 1.6067, 1.5519],
    [1.3884, 1.7277, 1.5355, 1.5176, 1.3688],
    [1.4039, 1.6697, 1.5089, 1.4627, 1.522],
    [1.4158, 1.7667, 1.4278, 1.5928, 1.4181],
    [1.5821, 1.3355, 1.5777, 1.3908, 1.7559],
    [1.2856, 1.4106, 1.4447, 1.6398, 1.1928],
    [1.4951, 1.4036, 1.5893, 1.6458, 1.4969],
    [1.3589, 1.2863, 1.5996, 1.2497, 1.5471],
    [1.5747, 1.5301, 1.5171, 1.1839, 1.8662],
    [1.368, 1.7269, 1.3957, 1.5014, 1.4449],
    [1.4163, 1.3864, 1.3057, 1.621, 1.5573],
    [1.5796, 1.4185, 1.6541, 1.5116, 1.7247],
    [1.7106, 1.4412, 1.2361, 1.382, 1.7601],
    [1.4371, 1.5051, 1.3485, 1.567, 1.488],
    [1.4738, 1.5936, 1.6583, 1.4973, 1.472],
    [1.5917, 1.5551, 1.4333, 1.5295, 1.6866],
    [1.6399, 1.5243, 1.5705, 1.5563, 1.553],
    [1.5797, 1.3663, 1.624, 1.3732, 1.6887],
  ];
  it('X̄-R — Montgomery hard-bake flow width (Table 6.1), spec 1.50 ± 0.50 µm: x̿ 1.5056, R̄ 0.32521, UCL 1.6932, LCL 1.3180, R UCL 0.68749, Cp ≈ 1.19', async () => {
    const r = await evaluate({
      chart: 'xbar-r',
      subgroups: HARD_BAKE,
      spec: { lsl: 1.0, usl: 2.0 },
      phase1: { first: 1, last: 25 },
    });
    expect(r.status).toBe(200);
    expect(r.body.limits.center).toBeCloseTo(1.5056, 4);
    expect(r.body.dispersion.center).toBeCloseTo(0.32521, 5);
    expect(r.body.limits.ucl).toBeCloseTo(1.6932, 4);
    expect(r.body.limits.lcl).toBeCloseTo(1.318, 4);
    expect(r.body.dispersion.ucl).toBeCloseTo(0.68749, 3); // book D4 = 2.114 (3 dp table)
    expect(r.body.capability.cp).toBeCloseTo(1.19, 2);
    expect(r.body.points).toHaveLength(25);
    expect(r.body.points[0].value).toBeCloseTo(1.5119, 4); // printed x̄₁
    expect(r.body.points[0].dispersionValue).toBeCloseTo(0.3679, 4); // printed R₁
    expect(r.body.phase1.suggestedExclusions).toEqual([]);
  });
});

describe('bad input: 400 problem+json with the offending field path', () => {
  async function refused(json: unknown, path: string) {
    const r = await evaluate(json);
    expect(r.status, JSON.stringify(r.body)).toBe(400);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    expect(paths(r.body)).toContain(path);
    return r;
  }

  it('too few subgroups (X̄-R with one subgroup) → subgroups', async () => {
    await refused({ chart: 'xbar-r', subgroups: [[1, 2, 3]] }, 'subgroups');
  });
  it('too few values (I-MR with one value) → values', async () => {
    await refused({ chart: 'imr', values: [1] }, 'values');
  });
  it('unequal subgroup sizes for X̄-R → the odd subgroup', async () => {
    await refused(
      {
        chart: 'xbar-r',
        subgroups: [
          [1, 2, 3],
          [2, 3, 4],
          [1, 2],
        ],
      },
      'subgroups.2',
    );
  });
  it('a subgroup of one for X̄-S → that subgroup', async () => {
    await refused({ chart: 'xbar-s', subgroups: [[1, 2], [3]] }, 'subgroups.1');
  });
  it('negative counts → counts.i', async () => {
    await refused({ chart: 'c', counts: [3, -1, 2] }, 'counts.1');
  });
  it('a count above its sample size (p chart) → counts.i', async () => {
    await refused({ chart: 'p', counts: [3, 60, 2], sizes: [50, 50, 50] }, 'counts.1');
  });
  it('sizes missing or of the wrong length → sizes', async () => {
    await refused({ chart: 'u', counts: [3, 1, 2] }, 'sizes');
    await refused({ chart: 'p', counts: [3, 1, 2], sizes: [50, 50] }, 'sizes');
  });
  it('"NaN" as a string in a number array → values.i (JSON has no NaN)', async () => {
    await refused({ chart: 'imr', values: [1, 2, 3, 'NaN', 5] }, 'values.3');
  });
  it('null in a number array → values.i', async () => {
    await refused({ chart: 'imr', values: [1, null, 3] }, 'values.1');
  });
  it('"NaN" inside a subgroup → subgroups.i.j', async () => {
    await refused(
      {
        chart: 'xbar-r',
        subgroups: [
          [1, 2, 3],
          [1, 'NaN', 3],
        ],
      },
      'subgroups.1.1',
    );
  });
  it('a number too large for a double (1e999 parses to Infinity) → values.i', async () => {
    const r = await fetch(`${base()}/api/v1/spc/evaluate`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: viewer.cookie },
      body: '{"chart":"imr","values":[1,2,1e999,4]}',
    });
    expect(r.status).toBe(400);
    expect(paths((await r.json()) as { errors: { path: string }[] })).toContain('values.2');
  });
  it('a spec with neither limit → spec; limits the wrong way round → spec.usl; target outside → spec.target', async () => {
    await refused({ chart: 'imr', values: [1, 2, 3], spec: {} }, 'spec');
    await refused({ chart: 'imr', values: [1, 2, 3], spec: { lsl: 5, usl: 3 } }, 'spec.usl');
    await refused({ chart: 'imr', values: [1, 2, 3], spec: { lsl: 1, usl: 3, target: 9 } }, 'spec.target');
  });
  it('a spec on an attribute chart → spec', async () => {
    await refused({ chart: 'c', counts: [1, 2, 3], spec: { usl: 5 } }, 'spec');
  });
  it('an unknown chart → chart; an unknown rule → rules.i; a rule twice → rules.i', async () => {
    await refused({ chart: 'xbar-q', values: [1, 2] }, 'chart');
    await refused({ chart: 'imr', values: [1, 2, 3], rules: ['we1', 'nelson9'] }, 'rules.1');
    await refused({ chart: 'imr', values: [1, 2, 3], rules: ['we1', 'we1'] }, 'rules.1');
  });
  it('data the chart does not take → that field; data it needs missing → that field', async () => {
    await refused(
      {
        chart: 'imr',
        subgroups: [
          [1, 2],
          [3, 4],
        ],
      },
      'subgroups',
    );
    await refused({ chart: 'xbar-r', values: [1, 2, 3] }, 'subgroups');
  });
  it('phase1 out of range → phase1.last; reversed → phase1.first', async () => {
    await refused({ chart: 'imr', values: [1, 2, 3, 4], phase1: { first: 1, last: 9 } }, 'phase1.last');
    await refused({ chart: 'imr', values: [1, 2, 3, 4], phase1: { first: 3, last: 2 } }, 'phase1.first');
  });
  it('EWMA parameters out of range → lambda; on another chart → L; CUSUM h ≤ 0 → h', async () => {
    await refused({ chart: 'ewma', values: [1, 2, 3], lambda: 1.5 }, 'lambda');
    await refused({ chart: 'imr', values: [1, 2, 3], L: 3 }, 'L');
    await refused({ chart: 'cusum', values: [1, 2, 3], h: 0 }, 'h');
  });
  it('a negative sigma → sigma', async () => {
    await refused({ chart: 'imr', values: [1, 2, 3], target: 2, sigma: -1 }, 'sigma');
  });
  it('malformed JSON → 400 problem; another content type → 415', async () => {
    const bad = await fetch(`${base()}/api/v1/spc/evaluate`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: viewer.cookie },
      body: '{"chart":',
    });
    expect(bad.status).toBe(400);
    expect(bad.headers.get('content-type')).toContain('application/problem+json');
    // (A same-origin browser form; Astro's own CSRF check refuses cross-site text/plain bodies first.)
    const text = await fetch(`${base()}/api/v1/spc/evaluate`, {
      method: 'POST',
      headers: { 'content-type': 'text/plain', cookie: viewer.cookie, origin: base() },
      body: 'x',
    });
    expect(text.status).toBe(415);
  });
  it('anonymous → 401; any signed-in role may evaluate', async () => {
    const anon = await evaluate({ chart: 'imr', values: [1, 2, 3] }, null);
    expect(anon.status).toBe(401);
    const op = await evaluate({ chart: 'imr', values: [1, 2, 3] }, operator);
    expect(op.status).toBe(200);
  });
});
