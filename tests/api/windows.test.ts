/**
 * Process windows: draft → signed approval (right and wrong password), versions superseding
 * each other with their diff, which window a line runs over time (windowInForce walking up the
 * asset tree), assignment history, and the roles that may change them.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { windowInForce } from '../../src/lib/core/window-store.ts';
import type { ProcessWindowLimits } from '../../src/lib/shared/windows.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { waitFor } from '../support/ingest-harness.ts';
import { TEST_PASSWORD } from '../support/test-stack.ts';

const tag = randomBytes(3).toString('hex');
let pool: pg.Pool;
let engineer: Session;
let operator: Session;
let lacquerId: number;
let cr39: number;
let pc: number;
let lineId: number;
let tankId: number;

const limits = (viscMax = 12.5): ProcessWindowLimits => ({
  withdrawalSpeedMmS: { min: 1.8, max: 2.2, target: 2.0 },
  viscosityMm2S: { min: 7, max: viscMax, target: 9.5 },
  bathTempC: { min: 10, max: 14 },
  roomRhPct: { min: 30, max: 55 },
  flashOffMin: { min: 5, max: 20 },
  cureSetpointC: { min: 105, max: 115, target: 110 },
  minCureTempC: 100,
  minEquivalentMinutes: 150,
  referenceC: 110,
  activationEnergyKJMol: 75,
  maxPartTempC: 125,
  maxRampCPerMin: 5,
  targetDryThicknessUm: 2,
  maxGapSeconds: 120,
});

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  engineer = await signIn('engineer');
  operator = await signIn('operator');
  const lac = await api('/api/v1/lacquers', {
    method: 'POST',
    session: engineer,
    json: { name: `Test siloxane ${tag}`, maker: 'Test maker', solidsPct: 30, densityGCm3: 0.95, activationEnergyKJMol: 75 },
  });
  expect(lac.status).toBe(201);
  lacquerId = lac.body.id;
  const mats = await api('/api/v1/materials', { session: operator });
  cr39 = mats.body.find((m: any) => m.code === 'cr39-1.50').id;
  pc = mats.body.find((m: any) => m.code === 'pc-1.59').id;
  // A line of this test's own (with a tank under it), so the demo plant's assignments are untouched.
  const { rows: site } = await pool.query(`select id from sites where code = 'fernhollow'`);
  const { rows: line } = await pool.query(
    `insert into assets (site_id, kind, code, name) values ($1, 'line', $2, $3) returning id`,
    [site[0].id, `wt-${tag}`, `Window test line ${tag}`],
  );
  lineId = line[0].id;
  const { rows: tank } = await pool.query(
    `insert into assets (site_id, parent_id, kind, code, name, details) values ($1, $2, 'tank', $3, 'Window test tank', '{"role":"hard-coat"}') returning id`,
    [site[0].id, lineId, `wt-${tag}-hc`],
  );
  tankId = tank[0].id;
});

afterAll(async () => {
  await pool.end();
});

describe('process windows', () => {
  let v1: any;
  let v2: any;
  let assignedAt: string;

  it('an engineer creates a draft; limits without a range are refused with field paths', async () => {
    const bad = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: cr39, name: 'bad', limits: { ...limits(), viscosityMm2S: { min: 12, max: 7 } } },
    });
    expect(bad.status).toBe(400);
    expect(bad.headers.get('content-type')).toContain('application/problem+json');
    expect(bad.body.errors.map((e: any) => e.path)).toContain('limits.viscosityMm2S.max');

    const r = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: cr39, name: `W ${tag}`, limits: limits() },
    });
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ version: 1, status: 'draft', substrate: 'CR-39-type 1.50' });
    v1 = r.body;
    // one draft at a time per lacquer × substrate
    const again = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: cr39, name: 'x', limits: limits() },
    });
    expect(again.status).toBe(409);
  });

  it('an operator may read but not create, edit or approve (403)', async () => {
    expect((await api('/api/v1/windows', { session: operator })).status).toBe(200);
    const create = await api('/api/v1/windows', {
      method: 'POST',
      session: operator,
      json: { lacquerId, materialId: pc, name: 'op', limits: limits() },
    });
    expect(create.status).toBe(403);
    const edit = await api(`/api/v1/windows/${v1.id}`, { method: 'PATCH', session: operator, json: { name: 'op edit' } });
    expect(edit.status).toBe(403);
    const approve = await api(`/api/v1/windows/${v1.id}/approve`, {
      method: 'POST',
      session: operator,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(approve.status).toBe(403);
  });

  it('a draft can be edited (audited with before and after)', async () => {
    const r = await api(`/api/v1/windows/${v1.id}`, {
      method: 'PATCH',
      session: engineer,
      json: { limits: limits(12.0), note: 'tightened' },
    });
    expect(r.status).toBe(200);
    expect(r.body.limits.viscosityMm2S.max).toBe(12.0);
    const { rows } = await pool.query(`select before, after from audit_log where action = 'window.edit' and entity_id = $1`, [
      String(v1.id),
    ]);
    expect(rows).toHaveLength(1);
    expect(rows[0].before.limits.viscosityMm2S.max).toBe(12.5);
    expect(rows[0].after.limits.viscosityMm2S.max).toBe(12.0);
  });

  it('approval with a wrong password is refused and leaves the draft a draft', async () => {
    const r = await api(`/api/v1/windows/${v1.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: 'not-the-password', meaning: 'approved' },
    });
    expect(r.status).toBe(403);
    expect(r.body.errors[0].path).toBe('password');
    const meaning = await api(`/api/v1/windows/${v1.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'reviewed' },
    });
    expect(meaning.status).toBe(400);
    expect(meaning.body.errors[0].path).toBe('meaning');
    const w = await api(`/api/v1/windows/${v1.id}`, { session: engineer });
    expect(w.body.window.status).toBe('draft');
  });

  it('approval with the password makes it effective now, with the signature stored and audited', async () => {
    const before = Date.now();
    const r = await api(`/api/v1/windows/${v1.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('effective');
    expect(r.body.approvedSignature).toMatchObject({ username: 'engineer', displayName: 'Emil Engineer', meaning: 'approved' });
    expect(Date.parse(r.body.effectiveFrom)).toBeGreaterThanOrEqual(before - 5000);
    v1 = r.body;
    const { rows } = await pool.query(`select signature from audit_log where action = 'window.approve' and entity_id = $1`, [
      String(v1.id),
    ]);
    expect(rows).toHaveLength(1);
    expect(rows[0].signature.meaning).toBe('approved');
    // an effective version is immutable
    const edit = await api(`/api/v1/windows/${v1.id}`, { method: 'PATCH', session: engineer, json: { name: 'late edit' } });
    expect(edit.status).toBe(409);
  });

  it('assigns the window to a line; a tank on the line runs it too; drafts and tanks cannot be assigned', async () => {
    const tankAssign = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: engineer,
      json: { assetId: tankId, windowId: v1.id },
    });
    expect(tankAssign.status).toBe(400);
    expect(tankAssign.body.errors[0].path).toBe('assetId');
    const op = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: operator,
      json: { assetId: lineId, windowId: v1.id },
    });
    expect(op.status).toBe(403);
    const r = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: engineer,
      json: { assetId: lineId, windowId: v1.id, note: 'start' },
    });
    expect(r.status).toBe(201);
    assignedAt = r.body.validFrom;
    const inForce = await api(`/api/v1/windows/in-force?assetId=${tankId}`, { session: operator });
    expect(inForce.status).toBe(200);
    expect(inForce.body).toMatchObject({ id: v1.id, version: 1, substrate: 'CR-39-type 1.50' });
    const { rows } = await pool.query(`select after from audit_log where action = 'window.assign' and entity_id = $1`, [
      String(r.body.id),
    ]);
    expect(rows[0].after).toMatchObject({ assetId: lineId, windowId: v1.id });
  });

  it('a new version supersedes the previous one at approval; the diff lists what changed', async () => {
    const d = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: cr39, name: `W ${tag}`, limits: { ...limits(12.0), maxPartTempC: 122 } },
    });
    expect(d.status).toBe(201);
    expect(d.body.version).toBe(2);
    // Approve only once the clock has passed the assignment, so that v1 is in force for a while
    // before v2 supersedes it (the next test looks between the two).
    await waitFor(async () => Date.now() > Date.parse(assignedAt) + 1, 5_000, 'the clock to pass the assignment');
    const a = await api(`/api/v1/windows/${d.body.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(a.status).toBe(200);
    v2 = a.body;
    const all = await api(`/api/v1/windows/${v1.id}`, { session: engineer });
    expect(all.body.window.status).toBe('superseded');
    expect(all.body.window.supersededAt).toBe(v2.effectiveFrom);
    const [latest, first] = all.body.versions;
    expect(latest.version).toBe(2);
    expect(latest.changes).toEqual([{ path: 'maxPartTempC', before: 125, after: 122 }]);
    expect(first.changes).toEqual([]);
    const eff = await api('/api/v1/windows?status=effective', { session: operator });
    expect(eff.body.filter((w: any) => w.lacquerId === lacquerId && w.materialId === cr39).map((w: any) => w.version)).toEqual([
      2,
    ]);
  });

  it('windowInForce follows the versions over time (and is null before the assignment)', async () => {
    const mid = (Date.parse(assignedAt) + Date.parse(v2.effectiveFrom)) / 2;
    expect(await windowInForce(pool, lineId, Date.parse(assignedAt) - 1000)).toBeNull();
    expect((await windowInForce(pool, tankId, mid))?.version).toBe(1);
    expect((await windowInForce(pool, tankId, Date.now()))?.version).toBe(2);
    const at = new Date(mid).toISOString();
    const viaApi = await api(`/api/v1/windows/in-force?assetId=${lineId}&at=${encodeURIComponent(at)}`, { session: operator });
    expect(viaApi.body.id).toBe(v1.id);
    const none = await api(
      `/api/v1/windows/in-force?assetId=${lineId}&at=${encodeURIComponent(new Date(Date.parse(assignedAt) - 1000).toISOString())}`,
      { session: operator },
    );
    expect(none.status).toBe(404);
  });

  it('a second assignment closes the first; the history shows both; overlapping starts are refused', async () => {
    const d = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: pc, name: `PC ${tag}`, limits: { ...limits(), maxPartTempC: 130 } },
    });
    const a = await api(`/api/v1/windows/${d.body.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(a.status).toBe(200);
    const draftOnly = await api('/api/v1/windows', {
      method: 'POST',
      session: engineer,
      json: { lacquerId, materialId: pc, name: 'draft', limits: limits() },
    });
    const refused = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: engineer,
      json: { assetId: lineId, windowId: draftOnly.body.id },
    });
    expect(refused.status).toBe(400);
    const overlap = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: engineer,
      json: { assetId: lineId, windowId: a.body.id, from: new Date(Date.parse(assignedAt) - 60_000).toISOString() },
    });
    expect(overlap.status).toBe(409);
    const r = await api('/api/v1/windows/assignments', {
      method: 'POST',
      session: engineer,
      json: { assetId: lineId, windowId: a.body.id },
    });
    expect(r.status).toBe(201);
    const hist = await api(`/api/v1/windows/assignments?assetId=${lineId}`, { session: operator });
    expect(hist.body).toHaveLength(2);
    expect(hist.body[0]).toMatchObject({ windowId: a.body.id, validTo: null, substrate: 'Polycarbonate 1.59' });
    expect(hist.body[1]).toMatchObject({ windowId: v1.id, validTo: hist.body[0].validFrom });
    expect((await windowInForce(pool, tankId, Date.now()))?.substrate).toBe('Polycarbonate 1.59');
    // before the switch the line still ran the CR-39 recipe, at the version in force then
    expect((await windowInForce(pool, tankId, Date.parse(hist.body[0].validFrom) - 1))?.id).toBe(v2.id);
  });

  it('the demo plant runs the example windows (seeded 30 days back)', async () => {
    const { rows } = await pool.query(`select id from assets where code = 'dip-1-hc'`);
    const w = await windowInForce(pool, rows[0].id, Date.now() - 20 * 86_400_000);
    expect(w?.lacquer).toBe('FH-Siloxane 30 (example)');
    expect(w?.limits.viscosityMm2S).toEqual({ min: 7, max: 12.5, target: 9.5 });
    const { rows: zone } = await pool.query(`select id from assets where code = 'oven-c-z1'`);
    expect((await windowInForce(pool, zone[0].id, Date.now()))?.limits.maxPartTempC).toBe(130);
  });
});
