/**
 * Characteristics and control-limit studies through the API: create (with back-fill from stored
 * readings), trial study with the library's suggested exclusions, draft, approval with an
 * electronic signature (wrong password, wrong role, wrong meaning, back-dated effect refused),
 * versioning (the previous set superseded but readable), edits, and discarding a draft.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { api, base, signIn, type Session } from '../support/http.ts';
import { TEST_PASSWORD } from '../support/test-stack.ts';

let pool: pg.Pool;
let engineer: Session;
let operator: Session;
let viewer: Session;
const tag = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;
let channelId = 0;
let charId = 0;
/** The 40 readings (one per minute, ending a minute ago): a stable process with one wild value. */
const values: number[] = [];
let times: number[] = [];
const OUTLIER = 26; // 1-based

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  engineer = await signIn('engineer');
  operator = await signIn('operator');
  viewer = await signIn('viewer');
  const { rows } = await pool.query<{ asset: number; device: number }>(
    `select a.id as asset, d.id as device from assets a, devices d where a.code = 'dip-2-hc' and d.username = 'gw-dip-2'`,
  );
  const ch = await pool.query<{ id: number }>(
    `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, 'other', 'u', 0, 100) returning id`,
    [rows[0]!.asset, rows[0]!.device, `spc-api-${tag}`.slice(0, 32), `SPC API test ${tag}`],
  );
  channelId = ch.rows[0]!.id;
  const now = Date.now();
  times = Array.from({ length: 40 }, (_, i) => now - (41 - i) * 60_000);
  // A deterministic wobble around 10 (hand-made), and one wild value.
  for (let i = 0; i < 40; i++)
    values.push(i + 1 === OUTLIER ? 13 : Math.round((10 + 0.1 * Math.sin(i * 1.7) + 0.05 * Math.cos(i * 0.9)) * 1000) / 1000);
  await pool.query(
    `insert into readings (channel_id, ts, value, quality) select $1, to_timestamp(t / 1000.0), v, 0 from unnest($2::float8[], $3::float8[]) as x(t, v)`,
    [channelId, times, values],
  );
});

afterAll(async () => {
  await pool.end();
});

const fields = () => ({
  name: `SPC API test ${tag}`,
  description: 'A test characteristic.',
  channelIds: [channelId],
  subgroupRule: { kind: 'per-manual-check', minSpacingMinutes: 0 },
  subgroupSize: 1,
  chart: 'imr',
  rules: ['we1'],
  spec: { mode: 'fixed', lsl: 9, usl: 11 },
  unit: 'u',
});

const baseline = () => ({
  baselineFrom: new Date(times[0]! - 1000).toISOString(),
  baselineTo: new Date(times[39]! + 1000).toISOString(),
});

/** Hand-computed I-MR limits (Montgomery §6.4: x̄ ± 3·MR̄/d2, d2(2) = 2/√π ≈ 1.128, App. VI) excluding 1-based `skip`. */
function imrLimits(xs: number[], skip: Set<number>) {
  const kept = xs.map((x, i) => ({ x, i: i + 1 })).filter((p) => !skip.has(p.i));
  const center = kept.reduce((a, p) => a + p.x, 0) / kept.length;
  const mrs: number[] = [];
  for (let i = 1; i < xs.length; i++) if (!skip.has(i) && !skip.has(i + 1)) mrs.push(Math.abs(xs[i]! - xs[i - 1]!));
  const mrBar = mrs.reduce((a, b) => a + b, 0) / mrs.length;
  const sigma = mrBar / (2 / Math.sqrt(Math.PI));
  return { center, ucl: center + 3 * sigma, lcl: center - 3 * sigma, mrBar, sigma };
}

describe('characteristics', () => {
  it('only engineers create; bad settings are 400 with the field path', async () => {
    expect((await api('/api/v1/characteristics', { method: 'POST', session: operator, json: fields() })).status).toBe(403);
    const bad = await api('/api/v1/characteristics', {
      method: 'POST',
      session: engineer,
      json: { ...fields(), subgroupSize: 5 },
    });
    expect(bad.status).toBe(400);
    expect(bad.body.errors.map((e: { path: string }) => e.path)).toContain('subgroupSize');
    const noChannel = await api('/api/v1/characteristics', {
      method: 'POST',
      session: engineer,
      json: { ...fields(), channelIds: [999999] },
    });
    expect(noChannel.status).toBe(400);
    expect(noChannel.body.errors[0].path).toBe('channelIds.0');
    const badSpec = await api('/api/v1/characteristics', {
      method: 'POST',
      session: engineer,
      json: { ...fields(), spec: { mode: 'fixed', lsl: 11, usl: 9 } },
    });
    expect(badSpec.status).toBe(400);
    expect(badSpec.body.errors[0].path).toBe('spec.usl');
  });

  it('creates one and back-fills its points from the stored readings', async () => {
    const r = await api('/api/v1/characteristics', { method: 'POST', session: engineer, json: { ...fields(), backfillDays: 1 } });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    charId = r.body.id;
    expect(r.body.channels[0].id).toBe(channelId);
    const pts = await api(`/api/v1/characteristics/${charId}/points?last=100`, { session: viewer });
    expect(pts.status).toBe(200);
    expect(pts.body.totalPoints).toBe(40);
    expect(pts.body.points.map((p: { value: number }) => p.value)).toEqual(values);
    expect(
      pts.body.points.every(
        (p: { limitSetId: number | null; violations: string[] }) => p.limitSetId === null && p.violations.length === 0,
      ),
    ).toBe(true);
    expect(pts.body.spec).toEqual({ lsl: 9, usl: 11 });
    // The same name twice is refused.
    const dup = await api('/api/v1/characteristics', { method: 'POST', session: engineer, json: fields() });
    expect(dup.status).toBe(400);
    expect(dup.body.errors[0].path).toBe('name');
  });
});

describe('control-limit study and approval', () => {
  let v1 = 0;
  let v1Limits: { center: number; ucl: number; lcl: number } = { center: 0, ucl: 0, lcl: 0 };

  it('a trial study suggests excluding the wild value and computes limits from all points (nothing stored)', async () => {
    const r = await api(`/api/v1/characteristics/${charId}/study`, { method: 'POST', session: engineer, json: baseline() });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    expect(r.body.points).toHaveLength(40);
    expect(r.body.suggested.map((s: { index: number }) => s.index)).toContain(OUTLIER);
    const hand = imrLimits(values, new Set());
    expect(r.body.limits.center).toBeCloseTo(hand.center, 9);
    expect(r.body.limits.ucl).toBeCloseTo(hand.ucl, 9);
    expect(r.body.points[OUTLIER - 1].trialViolations).toContain('we1');
    expect(r.body.capability).not.toBeNull();
    const sets = await api(`/api/v1/characteristics/${charId}/limit-sets`, { session: viewer });
    expect(sets.body).toEqual([]);
  });

  it('excluding it needs a reason; with one, the limits come from the other 39 points (hand-computed)', async () => {
    const noReason = await api(`/api/v1/characteristics/${charId}/study`, {
      method: 'POST',
      session: engineer,
      json: { ...baseline(), exclusions: [{ index: OUTLIER, reason: '' }] },
    });
    expect(noReason.status).toBe(400);
    expect(noReason.body.errors[0].path).toBe('exclusions.0.reason');
    const outside = await api(`/api/v1/characteristics/${charId}/study`, {
      method: 'POST',
      session: engineer,
      json: { ...baseline(), exclusions: [{ index: 99, reason: 'not there' }] },
    });
    expect(outside.status).toBe(400);
    expect(outside.body.errors[0].path).toBe('exclusions');
    const r = await api(`/api/v1/characteristics/${charId}/study`, {
      method: 'POST',
      session: engineer,
      json: { ...baseline(), exclusions: [{ index: OUTLIER, reason: 'Sensor knocked during a bath check' }] },
    });
    expect(r.status).toBe(200);
    const hand = imrLimits(values, new Set([OUTLIER]));
    expect(r.body.limits.center).toBeCloseTo(hand.center, 9);
    expect(r.body.limits.ucl).toBeCloseTo(hand.ucl, 9);
    expect(r.body.limits.lcl).toBeCloseTo(hand.lcl, 9);
    expect(r.body.dispersion.center).toBeCloseTo(hand.mrBar, 9);
    expect(r.body.includedPoints).toBe(39);
    expect(r.body.points[OUTLIER - 1].excludedInStudy).toBe(true);
    expect(
      (await api(`/api/v1/characteristics/${charId}/study`, { method: 'POST', session: operator, json: baseline() })).status,
    ).toBe(403);
  });

  it('saves a draft, then approval needs the right role, meaning, password and time', async () => {
    const d = await api(`/api/v1/characteristics/${charId}/limit-sets`, {
      method: 'POST',
      session: engineer,
      json: {
        ...baseline(),
        exclusions: [{ index: OUTLIER, reason: 'Sensor knocked during a bath check' }],
        note: 'first study',
      },
    });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    expect(d.body).toMatchObject({
      status: 'draft',
      version: 1,
      effectiveFrom: null,
      approvedSignature: null,
      baselinePoints: 40,
    });
    v1 = d.body.id;
    v1Limits = { center: d.body.center, ucl: d.body.ucl, lcl: d.body.lcl };
    const url = `/api/v1/characteristics/${charId}/limit-sets/${v1}/approve`;
    expect(
      (await api(url, { method: 'POST', session: operator, json: { password: TEST_PASSWORD, meaning: 'approved' } })).status,
    ).toBe(403);
    const wrong = await api(url, {
      method: 'POST',
      session: engineer,
      json: { password: 'not-the-password', meaning: 'approved' },
    });
    expect(wrong.status).toBe(403);
    expect(wrong.body.errors[0].path).toBe('password');
    const meaning = await api(url, { method: 'POST', session: engineer, json: { password: TEST_PASSWORD, meaning: 'reviewed' } });
    expect(meaning.status).toBe(400);
    expect(meaning.body.errors[0].path).toBe('meaning');
    const past = await api(url, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved', effectiveFrom: new Date(times[10]!).toISOString() },
    });
    expect(past.status).toBe(400);
    expect(past.body.errors[0].path).toBe('effectiveFrom');
    const still = await api(`/api/v1/characteristics/${charId}/limit-sets/${v1}`, { session: viewer });
    expect(still.body.status).toBe('draft');
  });

  it('approves with the signature; the excluded point is marked on the chart; the audit trail holds the signature', async () => {
    const r = await api(`/api/v1/characteristics/${charId}/limit-sets/${v1}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    expect(r.body.status).toBe('approved');
    expect(r.body.approvedSignature).toMatchObject({ username: 'engineer', meaning: 'approved' });
    expect(Date.parse(r.body.effectiveFrom)).toBeGreaterThan(times[39]!);
    const again = await api(`/api/v1/characteristics/${charId}/limit-sets/${v1}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(again.status).toBe(409);
    const pts = await api(`/api/v1/characteristics/${charId}/points?last=100`, { session: viewer });
    const out = pts.body.points[OUTLIER - 1];
    expect(out.excluded).toBe(true);
    expect(out.exclusionReason).toContain('Sensor knocked');
    // Points judged before the approval keep their (absent) limits: never re-judged.
    expect(pts.body.points.every((p: { limitSetId: number | null }) => p.limitSetId === null)).toBe(true);
    const { rows } = await pool.query(
      `select signature from audit_log where action = 'limits.approve' and entity = 'limit-set' and entity_id = $1`,
      [String(v1)],
    );
    expect(rows).toHaveLength(1);
    expect(rows[0].signature).toMatchObject({ username: 'engineer', meaning: 'approved' });
  });

  it('a second approval supersedes the first, which stays readable and unchanged', async () => {
    const d = await api(`/api/v1/characteristics/${charId}/limit-sets`, {
      method: 'POST',
      session: engineer,
      json: { ...baseline(), note: 'all points' },
    });
    expect(d.status).toBe(201);
    expect(d.body.version).toBe(2);
    const a = await api(`/api/v1/characteristics/${charId}/limit-sets/${d.body.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(a.status).toBe(200);
    const sets = await api(`/api/v1/characteristics/${charId}/limit-sets`, { session: viewer });
    expect(sets.body.map((s: { version: number; status: string }) => [s.version, s.status])).toEqual([
      [2, 'approved'],
      [1, 'superseded'],
    ]);
    const old = await api(`/api/v1/characteristics/${charId}/limit-sets/${v1}`, { session: viewer });
    expect(old.status).toBe(200);
    expect({ center: old.body.center, ucl: old.body.ucl, lcl: old.body.lcl }).toEqual(v1Limits);
    expect(old.body.effectiveFrom).not.toBeNull();
    expect(Date.parse(a.body.effectiveFrom)).toBeGreaterThan(Date.parse(old.body.effectiveFrom));
    const chart = await api(`/api/v1/characteristics/${charId}/points`, { session: viewer });
    expect(chart.body.limitSets).toHaveLength(2);
  });

  it('a draft can be discarded; approved and superseded sets cannot', async () => {
    const d = await api(`/api/v1/characteristics/${charId}/limit-sets`, { method: 'POST', session: engineer, json: baseline() });
    expect(d.status).toBe(201);
    expect(
      (
        await api(`/api/v1/characteristics/${charId}/limit-sets/${d.body.id}`, {
          method: 'DELETE',
          session: engineer,
          headers: { origin: base() },
        })
      ).status,
    ).toBe(204);
    expect((await api(`/api/v1/characteristics/${charId}/limit-sets/${d.body.id}`, { session: viewer })).status).toBe(404);
    expect(
      (
        await api(`/api/v1/characteristics/${charId}/limit-sets/${v1}`, {
          method: 'DELETE',
          session: engineer,
          headers: { origin: base() },
        })
      ).status,
    ).toBe(409);
  });
});

describe('editing', () => {
  it('how points are formed is fixed once there are points (409); rules and spec can change (audited)', async () => {
    const structural = await api(`/api/v1/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { ...fields(), chart: 'ewma' },
    });
    expect(structural.status).toBe(409);
    const ok = await api(`/api/v1/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { ...fields(), rules: ['we1', 'we2'], spec: { mode: 'fixed', usl: 12 } },
    });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.rules).toEqual(['we1', 'we2']);
    const { rows } = await pool.query(
      `select before, after from audit_log where action = 'characteristic.update' and entity_id = $1`,
      [String(charId)],
    );
    expect(rows.length).toBeGreaterThan(0);
    expect(rows[rows.length - 1].after.rules).toEqual(['we1', 'we2']);
    expect((await api(`/api/v1/characteristics/${charId}`, { method: 'PUT', session: viewer, json: fields() })).status).toBe(403);
  });
});

describe('point details', () => {
  it('a seeded withdrawal-speed point lists its raw reading and the dip run it belongs to', async () => {
    const { rows } = await pool.query<{ cid: number; pid: number; run: number; t: Date }>(
      `select c.id as cid, p.id as pid, d.id as run, p.t
         from characteristics c
         join spc_points p on p.characteristic_id = c.id
         join dip_runs d on d.line_asset_id = c.asset_id and abs(extract(epoch from (coalesce(d.stroke_ended_at, d.dipped_at) - p.t))) < 30
        where c.name = 'Line 1 withdrawal speed'
        order by p.idx desc limit 1`,
    );
    const r = rows[0];
    expect(r, 'the demo seed has dip runs on line 1 at the strokes of the seeded history').toBeDefined();
    const d = await api(`/api/v1/characteristics/${r!.cid}/points/${r!.pid}`, { session: viewer });
    expect(d.status).toBe(200);
    expect(d.body.members).toHaveLength(1);
    expect(d.body.readings).toHaveLength(1);
    expect(d.body.readings[0].v).toBe(d.body.members[0]);
    expect(d.body.dipRuns.map((x: { id: number }) => x.id)).toContain(r!.run);
    expect(d.body.limitSet.status).toMatch(/approved|superseded/);
    const other = await api(`/api/v1/characteristics/${charId}/points/${r!.pid}`, { session: viewer });
    expect(other.status).toBe(404); // a point is only found under its own characteristic
  });
});
