/**
 * The bath log through the API: a lot and a charge (engineer), checks in cup seconds whose
 * viscosity the server computes (ASTM D4212 Zahn cup equations) and stores with the check,
 * out-of-range cups refused, the addition recommended by solids mass balance, additions and
 * filter changes, pot-life state, roles, and the audit rows written.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { api, signIn, type Session } from '../support/http.ts';

const tag = randomBytes(3).toString('hex');
let pool: pg.Pool;
let engineer: Session;
let operator: Session;
let viewer: Session;
let tankId: number;
let lotId: number;
let checkId: number;
const DAY = 86_400_000;
const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  [engineer, operator, viewer] = await Promise.all([signIn('engineer'), signIn('operator'), signIn('viewer')]);
  // A line and hard-coat tank of this test's own, running the seeded example CR-39 window.
  const { rows: site } = await pool.query(`select id from sites where code = 'fernhollow'`);
  const { rows: line } = await pool.query(
    `insert into assets (site_id, kind, code, name) values ($1, 'line', $2, $3) returning id`,
    [site[0].id, `bt-${tag}`, `Bath test line ${tag}`],
  );
  const { rows: tank } = await pool.query(
    `insert into assets (site_id, parent_id, kind, code, name, details) values ($1, $2, 'tank', $3, $4, '{"role":"hard-coat","volumeL":40}') returning id`,
    [site[0].id, line[0].id, `bt-${tag}-hc`, `Bath test tank ${tag}`],
  );
  tankId = tank[0].id;
  const windows = await api('/api/v1/windows?status=effective', { session: engineer });
  const example = windows.body.find((w: any) => w.lacquer === 'FH-Siloxane 30 (example)' && w.substrate === 'CR-39-type 1.50');
  const assign = await api('/api/v1/windows/assignments', {
    method: 'POST',
    session: engineer,
    json: { assetId: line[0].id, windowId: example.id },
  });
  expect(assign.status).toBe(201);
});

afterAll(async () => {
  await pool.end();
});

describe('lots and charges (engineer)', () => {
  it('records a lot and charges the tank from it; operators may not', async () => {
    const lacquers = await api('/api/v1/lacquers', { session: operator });
    const lacquer = lacquers.body.find((l: any) => l.name === 'FH-Siloxane 30 (example)');
    expect(lacquer.solidsPct).toBe(30);
    const lotBody = {
      lacquerId: lacquer.id,
      lotCode: `T-${tag}`,
      receivedOn: day(Date.now() - 30 * DAY),
      expiresOn: day(Date.now() + 150 * DAY),
      solidsPct: 30.4,
    };
    expect((await api('/api/v1/lots', { method: 'POST', session: operator, json: lotBody })).status).toBe(403);
    const badDates = await api('/api/v1/lots', {
      method: 'POST',
      session: engineer,
      json: { ...lotBody, expiresOn: day(Date.now() - 40 * DAY) },
    });
    expect(badDates.status).toBe(400);
    expect(badDates.body.errors[0].path).toBe('expiresOn');
    const lot = await api('/api/v1/lots', { method: 'POST', session: engineer, json: lotBody });
    expect(lot.status).toBe(201);
    lotId = lot.body.id;
    expect((await api('/api/v1/lots', { method: 'POST', session: engineer, json: lotBody })).status).toBe(409);

    const expired = await api('/api/v1/lots', {
      method: 'POST',
      session: engineer,
      json: { ...lotBody, lotCode: `X-${tag}`, receivedOn: day(Date.now() - 300 * DAY), expiresOn: day(Date.now() - 10 * DAY) },
    });
    const refused = await api('/api/v1/baths/charges', {
      method: 'POST',
      session: engineer,
      json: { tankAssetId: tankId, lotId: expired.body.id, massKg: 38, potLifeDays: 30 },
    });
    expect(refused.status).toBe(400);
    expect(refused.body.errors[0].path).toBe('lotId');

    const charge = await api('/api/v1/baths/charges', {
      method: 'POST',
      session: engineer,
      json: { tankAssetId: tankId, lotId, massKg: 38, potLifeDays: 30, chargedAt: new Date(Date.now() - 25 * DAY).toISOString() },
    });
    expect(charge.status).toBe(201);
    expect(charge.body).toMatchObject({ lotCode: `T-${tag}`, lotSolidsPct: 30.4, lacquerSolidsPct: 30, massKg: 38 });
  });
});

describe('bath checks', () => {
  const count = async () =>
    Number((await pool.query(`select count(*) from bath_checks where tank_asset_id = $1`, [tankId])).rows[0].count);

  it('cup seconds → the server computes ν (ASTM D4212 Zahn 1: ν = 1.1(t − 29)) and stores it with the check', async () => {
    const r = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, cup: 'zahn-1', effluxSeconds: 37.6, bathTempC: 12.1, solidsPct: 31, bathMassKg: 38 },
    });
    expect(r.status).toBe(201);
    // hand-computed from the ASTM D4212 Zahn 1 equation: 1.1·(37.6 − 29) = 9.46 mm²/s, inside the example window 7.0–12.5
    expect(r.body.check.kinematicMm2S).toBeCloseTo(9.46, 10);
    expect(r.body.check.method).toMatch(/ASTM D4212/);
    expect(r.body.computation.band).toBe('in');
    expect(r.body.window.lacquer).toBe('FH-Siloxane 30 (example)');
    // solids mass balance, hand-computed: 38·(31/30 − 1) = 1.26667 kg of solvent back to the lacquer's 30 %
    expect(r.body.computation.addition).toMatchObject({ ok: true, kind: 'solvent' });
    expect(r.body.computation.addition.massKg).toBeCloseTo(1.26667, 4);
    checkId = r.body.check.id;
    const { rows } = await pool.query(
      `select cup, efflux_seconds, kinematic_mm2s, by_label, window_id from bath_checks where id = $1`,
      [checkId],
    );
    expect(rows[0]).toMatchObject({ cup: 'zahn-1', efflux_seconds: 37.6, by_label: 'operator' });
    expect(rows[0].kinematic_mm2s).toBeCloseTo(9.46, 10);
    expect(rows[0].window_id).toBe(r.body.window.id);
  });

  it('Zahn 2 at 20 s (the window’s lower edge): ν = 3.5(t − 14) = 21.0 mm²/s, above the window', async () => {
    const r = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: engineer,
      json: { tankAssetId: tankId, cup: 'zahn-2', effluxSeconds: 20 },
    });
    expect(r.status).toBe(201);
    // ASTM D4212 Zahn 2 equation, hand-computed
    expect(r.body.check.kinematicMm2S).toBeCloseTo(21.0, 10);
    expect(r.body.computation.band).toBe('high');
  });

  it('without a weighed mass the bath is taken at its charged mass; inside ±0.2 wt % nothing is suggested', async () => {
    const r = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, measuredMm2S: 10.2, solidsPct: 31 },
    });
    expect(r.status).toBe(201);
    // hand-computed: M = 38 kg charged; solvent = 38·(31/30 − 1) = 1.26667 kg
    expect(r.body.computation.bathMassKg).toBe(38);
    expect(r.body.computation.addition.massKg).toBeCloseTo(1.26667, 4);
    expect(r.body.check.measuredMm2S).toBe(10.2);
    const near = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, measuredMm2S: 9.1, solidsPct: 30.15 },
    });
    expect(near.body.computation.addition).toBeNull();
    expect(near.body.computation.additionNote).toMatch(/within ±0.2 wt %/);
  });

  it('an efflux time outside the cup’s window is refused, nothing stored', async () => {
    const before = await count();
    const r = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, cup: 'zahn-2', effluxSeconds: 15 },
    });
    expect(r.status).toBe(400);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    expect(r.body.title).toBe('Out of range — use another cup');
    expect(r.body.errors[0]).toMatchObject({ path: 'effluxSeconds' });
    expect(r.body.errors[0].message).toMatch(/out of range — use another cup/);
    expect(r.body.suggestedCup).toBe('zahn-1');
    expect(await count()).toBe(before);
  });

  it('the browser’s own viscosity number is not accepted; bad readings are 400s with paths', async () => {
    const forged = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, cup: 'zahn-1', effluxSeconds: 40, kinematicMm2S: 99 },
    });
    expect(forged.status).toBe(400);
    const neg = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, measuredMm2S: -3 },
    });
    expect(neg.status).toBe(400);
    expect(neg.body.errors[0].path).toBe('measuredMm2S');
    const both = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, cup: 'zahn-1', effluxSeconds: 40, measuredMm2S: 9 },
    });
    expect(both.status).toBe(400);
    const noSeconds = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, cup: 'zahn-1' },
    });
    expect(noSeconds.body.errors[0].path).toBe('effluxSeconds');
    const future = await api('/api/v1/baths/checks', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, measuredMm2S: 9, at: new Date(Date.now() + 3_600_000).toISOString() },
    });
    expect(future.status).toBe(400);
    expect(future.body.errors[0].path).toBe('at');
  });

  it('a viewer may read the log but not write it', async () => {
    expect(
      (await api('/api/v1/baths/checks', { method: 'POST', session: viewer, json: { tankAssetId: tankId, measuredMm2S: 9 } }))
        .status,
    ).toBe(403);
    const list = await api(`/api/v1/baths/checks?tankId=${tankId}`, { session: viewer });
    expect(list.status).toBe(200);
    expect(list.body.length).toBeGreaterThanOrEqual(3);
  });
});

describe('additions, filter changes and the bath overview', () => {
  it('logs the recommended solvent addition linked to its check, and a filter change', async () => {
    const r = await api('/api/v1/baths/additions', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, kind: 'solvent', massKg: 1.25, checkId },
    });
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ kind: 'solvent', massKg: 1.25, checkId, by: 'operator' });
    expect(r.body.recommendation).toMatchObject({ ok: true, kind: 'solvent' });
    const wrongTank = await api('/api/v1/baths/additions', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, kind: 'solvent', massKg: 1, checkId: 2_000_000_000 },
    });
    expect(wrongTank.status).toBe(400);
    const f = await api('/api/v1/baths/filter-changes', {
      method: 'POST',
      session: operator,
      json: { tankAssetId: tankId, filterType: 'Pleated 1 µm', ratingUm: 1 },
    });
    expect(f.status).toBe(201);
  });

  it('the overview shows the charge, its age against pot life, the last check against the window', async () => {
    const r = await api('/api/v1/baths', { session: viewer });
    const mine = r.body.find((b: any) => b.tank.id === tankId);
    expect(mine.charge.lotCode).toBe(`T-${tag}`);
    // 25 days of a 30-day pot life = 0.833 ≥ 0.8 → near the end
    expect(mine.age.status).toBe('near-end');
    expect(mine.age.ageDays).toBeCloseTo(25, 2);
    expect(mine.window.limits.viscosityMm2S.max).toBe(12.5);
    expect(mine.recentAdditions[0].massKg).toBe(1.25);
    expect(mine.lastFilterChange.filterType).toBe('Pleated 1 µm');
  });

  it('the seeded demo bath log holds hourly cup checks whose stored viscosity is the cup equation’s, and additions linked to them', async () => {
    const { rows } = await pool.query(
      `select k.cup, k.efflux_seconds, k.kinematic_mm2s from bath_checks k join assets a on a.id = k.tank_asset_id where a.code = 'dip-1-hc' and k.note = 'demo seed'`,
    );
    expect(rows.length).toBeGreaterThan(100);
    for (const r of rows.slice(0, 50)) {
      expect(r.cup).toBe('zahn-1');
      // ASTM D4212 Zahn 1: ν = 1.1·(t − 29)
      expect(r.kinematic_mm2s).toBeCloseTo(1.1 * (r.efflux_seconds - 29), 9);
    }
    const { rows: adds } = await pool.query(
      `select count(*)::int as n, count(check_id)::int as linked from bath_additions ad join assets a on a.id = ad.tank_asset_id where a.code in ('dip-1-hc','dip-2-hc') and ad.note = 'demo seed'`,
    );
    expect(adds[0].n).toBeGreaterThan(0);
    expect(adds[0].linked).toBe(adds[0].n);
  });

  it('every entry is in the audit trail with its author', async () => {
    const { rows } = await pool.query(
      `select action, actor_label from audit_log where (entity = 'bath_check' and after->>'tankAssetId' = $1) or (entity in ('bath_addition','filter_change','bath_charge') and after->>'tankAssetId' = $1) order by id`,
      [String(tankId)],
    );
    const actions = rows.map((r) => r.action);
    expect(actions.filter((a) => a === 'bath.check')).toHaveLength(4);
    expect(actions).toContain('bath.addition');
    expect(actions).toContain('bath.filter');
    expect(actions).toContain('bath.charge');
    expect(rows.find((r) => r.action === 'bath.addition').actor_label).toBe('operator');
  });
});
