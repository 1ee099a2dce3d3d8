/**
 * Trace, holds and nonconformances through the API, on a scenario built here with unique job
 * numbers: dip runs on a throwaway line (two bath charges, a bath check, a withdrawal stroke in
 * the stored readings), a second line, and oven loads filled by rack and by job scan. The trace
 * of the failed job must list exactly its siblings — everything that shared its oven load, or
 * was dipped from the same bath charge within ± 8 h — none missed, none extra. Holds are placed
 * by quality; releasing or dispositioning them is an electronic signature, and a wrong password
 * answers 403 and changes nothing.
 */
import type pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { TEST_PASSWORD } from '../support/test-stack.ts';
import { createTestLine, createTestOven, insertReadings, tag, type TestLine, type TestOven } from '../support/trace-fixtures.ts';

const H = 3_600_000;
let pool: pg.Pool;
let line: TestLine;
let line2: TestLine;
let oven: TestOven;
let operator: Session;
let quality: Session;
let viewer: Session;
let T: number;
let charge2: number;
let checkId: number;
const J: string[] = [];
const racks: Record<string, string> = {};
const dips: Record<string, number> = {};
let load1: number;
let load2: number;
let failedTestId: number;

const iso = (ms: number) => new Date(ms).toISOString();

async function dip(key: string, l: TestLine, atMs: number, jobs: string[], rack?: string) {
  const r = await api('/api/v1/dip-runs', {
    method: 'POST',
    session: operator,
    json: { lineAssetId: l.id, dippedAt: iso(atMs), jobNumbers: jobs, ...(rack ? { rackCode: rack } : {}) },
  });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  dips[key] = r.body.id;
  return r.body;
}

async function trace(job: string, hours?: number) {
  const r = await api(`/api/v1/trace/jobs/${encodeURIComponent(job)}${hours ? `?hours=${hours}` : ''}`, { session: viewer });
  expect(r.status, JSON.stringify(r.body)).toBe(200);
  return r.body;
}

const names = (sibs: { jobNumber: string }[]) => sibs.map((s) => s.jobNumber).sort();

beforeAll(async () => {
  pool = testPool();
  operator = await signIn('operator');
  quality = await signIn('quality');
  viewer = await signIn('viewer');
  line = await createTestLine(pool, 10);
  line2 = await createTestLine(pool, 10);
  oven = await createTestOven(pool);
  const t = tag();
  for (let i = 0; i <= 12; i++) J.push(`TR-${t}-${String(i).padStart(2, '0')}`);
  racks['A'] = `RA-${t}`;
  T = Math.floor((Date.now() - 3 * 86_400_000) / 1000) * 1000;
  // A bath check 30 min before the dip: 13.1 mm²/s, above the window's 12.5 (hand-chosen).
  const chk = await pool.query<{ id: number }>(
    `insert into bath_checks (tank_asset_id, charge_id, at, by_label, measured_mm2s, kinematic_mm2s, method, bath_temp_c)
     values ($1, $2, to_timestamp($3 / 1000.0), 'Test operator', 13.1, 13.1, 'measured', 12.4) returning id`,
    [line.tankId, line.chargeId, T - 0.5 * H],
  );
  checkId = chk.rows[0]!.id;
  // The withdrawal stroke of the dip at T: readings every 10 s, 2.01, 2.03, 1.99 mm/s between stops,
  // and an earlier separate stroke 4 min before (1.50 mm/s).
  await insertReadings(pool, [
    { ch: line.speedId, t: T - 240_000, v: 1.5 },
    { ch: line.speedId, t: T, v: 0 },
    { ch: line.speedId, t: T + 10_000, v: 2.01 },
    { ch: line.speedId, t: T + 20_000, v: 2.03 },
    { ch: line.speedId, t: T + 30_000, v: 1.99 },
    { ch: line.speedId, t: T + 40_000, v: 0 },
  ]);
  // A new charge in the same tank 5 h after T: dips after it belong to another charge.
  const lot = await pool.query<{ lot_id: number }>('select lot_id from bath_charges where id = $1', [line.chargeId]);
  charge2 = (
    await pool.query<{ id: number }>(
      `insert into bath_charges (tank_asset_id, lot_id, charged_at, mass_kg, pot_life_days) values ($1, $2, to_timestamp($3 / 1000.0), 38, 30) returning id`,
      [line.tankId, lot.rows[0]!.lot_id, T + 5 * H],
    )
  ).rows[0]!.id;

  await dip('D0', line, T, [J[0]!, J[1]!, J[2]!], racks['A']); // the traced job J0 and its rack mates
  await dip('D1', line, T + 2 * H, [J[3]!, J[4]!]); // same charge, 2 h later → siblings
  await dip('D2', line, T + 7.9 * H, [J[5]!]); // within 8 h but the NEW charge → not a sibling
  await dip('D3', line, T + 8.5 * H, [J[6]!]); // the new charge, 8.5 h later → a sibling only through the load
  await dip('D4', line, T - 3 * H, [J[7]!]); // same charge, 3 h earlier → sibling
  await dip('D5', line, T - 9 * H, [J[8]!]); // same charge, 9 h earlier → outside ±8 h
  await dip('D6', line2, T + 1 * H, [J[10]!]); // another line's bath → not a sibling

  // Oven load 1: the rack of D0 scanned as a rack, plus J6 and J12 scanned as jobs. Load 2: J3.
  const open1 = await api('/api/v1/loads', {
    method: 'POST',
    session: operator,
    json: { ovenAssetId: oven.id, openedAt: iso(T + 1 * H) },
  });
  expect(open1.status).toBe(201);
  load1 = open1.body.id;
  const scan = await api(`/api/v1/loads/${load1}/jobs`, {
    method: 'POST',
    session: operator,
    json: { rackCodes: [racks['A']], jobNumbers: [J[6], J[12]] },
  });
  expect(scan.status, JSON.stringify(scan.body)).toBe(200);
  expect(scan.body.fromRacks[racks['A']]).toEqual([J[0], J[1], J[2]]);
  expect(
    (await api(`/api/v1/loads/${load1}/close`, { method: 'POST', session: operator, json: { closedAt: iso(T + 4 * H) } })).status,
  ).toBe(200);
  const open2 = await api('/api/v1/loads', {
    method: 'POST',
    session: operator,
    json: { ovenAssetId: oven.id, openedAt: iso(T + 5 * H) },
  });
  load2 = open2.body.id;
  await api(`/api/v1/loads/${load2}/jobs`, { method: 'POST', session: operator, json: { jobNumbers: [J[3]] } });
  await api(`/api/v1/loads/${load2}/close`, { method: 'POST', session: operator, json: { closedAt: iso(T + 8 * H) } });

  // Tests: J0 fails a cross-cut (15 % → ISO 2409 class 2 / 3B), J3 passes one.
  const fail = await api('/api/v1/quality/tests', {
    method: 'POST',
    session: quality,
    json: { kind: 'crosscut', jobNumber: J[0], percentRemoved: 15 },
  });
  expect(fail.status).toBe(201);
  failedTestId = fail.body.id;
  await api('/api/v1/quality/tests', {
    method: 'POST',
    session: quality,
    json: { kind: 'crosscut', jobNumber: J[3], percentRemoved: 0 },
  });
}, 60_000);

afterAll(async () => {
  await closeTestPool();
});

describe('trace of a failed job', () => {
  it('lays out the dip with the bath at dip time, the load with its verdict and alarms, and the tests', async () => {
    const tr = await trace(J[0]!);
    expect(tr.job).toMatchObject({ jobNumber: J[0], status: 'active', activeHold: null });
    expect(tr.dipRuns).toHaveLength(1);
    const d = tr.dipRuns[0];
    expect(d.id).toBe(dips['D0']);
    expect(d.rackCode).toBe(racks['A']);
    // Hand-computed: the stroke nearest the dip is 2.01, 2.03, 1.99 → mean 2.01 mm/s over 3 readings.
    expect(d.withdrawalSpeedMmS).toBeCloseTo(2.01, 12);
    expect(d.strokeSamples).toBe(3);
    expect(d.bath.charge.id).toBe(line.chargeId);
    // Charged 10 days before "now", dipped 3 days before "now": about 7 days into a 30-day pot life.
    expect(d.bath.charge.age.ageDays).toBeGreaterThan(6.9);
    expect(d.bath.charge.age.ageDays).toBeLessThan(7.1);
    expect(d.bath.charge.age.status).toBe('ok');
    expect(d.bath.lastCheck).toMatchObject({ id: checkId, kinematicMm2S: 13.1, minutesBeforeDip: 30 });
    expect(d.bath.viscosityWindow).toEqual({ min: 7, max: 12.5 });
    expect(d.bath.viscosityStatus).toBe('high');
    expect(tr.loads.map((l: { id: number }) => l.id)).toEqual([load1]);
    // No oven readings were stored for the load: the cure cannot be verified, and its alarm is listed.
    expect(tr.loads[0].verdict).toBe('unverifiable');
    expect(tr.loads[0].alarms.map((a: { sourceLabel: string }) => a.sourceLabel)).toContain(`${oven.name} load ${load1} cure`);
    expect(tr.tests).toHaveLength(1);
    expect(tr.tests[0]).toMatchObject({ id: failedTestId, kind: 'crosscut', result: 'fail' });
    expect(tr.tests[0].summary).toContain('ISO 2409 class 2 / ASTM D3359 3B');
  });

  it('finds every sibling — same load, same bath charge within ±8 h — and nothing else', async () => {
    const tr = await trace(J[0]!);
    expect(tr.siblingWindowHours).toBe(8);
    // Same load 1: J1, J2 (rack mates), J6, J12. Same charge within ±8 h: J1, J2 (D0), J3, J4 (D1, +2 h), J7 (D4, −3 h).
    // Not: J5 (new charge), J8 (−9 h), J10 (other line), J9/J11 (never used), J0 itself.
    expect(names(tr.siblings)).toEqual([J[1], J[2], J[3], J[4], J[6], J[7], J[12]].sort());
    const by = Object.fromEntries(tr.siblings.map((s: { jobNumber: string }) => [s.jobNumber, s]));
    expect(by[J[1]!].sameLoads).toEqual([load1]);
    expect(by[J[1]!].sameBathRuns.map((b: { dipRunId: number }) => b.dipRunId)).toEqual([dips['D0']]);
    expect(by[J[6]!].sameLoads).toEqual([load1]);
    expect(by[J[6]!].sameBathRuns).toEqual([]);
    expect(by[J[3]!].sameLoads).toEqual([]);
    expect(by[J[3]!].sameBathRuns).toEqual([{ dipRunId: dips['D1'], dippedAt: iso(T + 2 * H), hoursApart: 2 }]);
    expect(by[J[3]!]).toMatchObject({ tests: 1, failed: 0, lastTest: { kind: 'crosscut', result: 'pass' } });
    expect(by[J[7]!].sameBathRuns[0].hoursApart).toBe(3);
    expect(by[J[12]!]).toMatchObject({ tests: 0, lastTest: null, activeHoldId: null });
  });

  it('each dip run is linked to the charge in its tank at the dip time', async () => {
    const d1 = await api(`/api/v1/dip-runs/${dips['D1']}`, { session: viewer });
    const d2 = await api(`/api/v1/dip-runs/${dips['D2']}`, { session: viewer });
    expect(d1.body.bathChargeId).toBe(line.chargeId);
    expect(d2.body.bathChargeId).toBe(charge2);
  });

  it('a wider window (±9 h) takes in the dip 9 h earlier, still not the other charge or line', async () => {
    const tr = await trace(J[0]!, 9);
    expect(names(tr.siblings)).toEqual([J[1], J[2], J[3], J[4], J[6], J[7], J[8], J[12]].sort());
  });

  it('an unknown job is a 404 problem; a malformed number a 400', async () => {
    const r = await api(`/api/v1/trace/jobs/NOPE-${tag()}`, { session: viewer });
    expect(r.status).toBe(404);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    const bad = await api(`/api/v1/trace/jobs/${encodeURIComponent('bad job!')}`, { session: viewer });
    expect(bad.status).toBe(400);
  });
});

describe('holds with signed release and disposition', () => {
  let holdIds: Record<string, number> = {};

  it('quality holds the failed job and its load siblings with a reason', async () => {
    const jobs = [J[0]!, J[1]!, J[2]!, J[6]!, J[12]!];
    const r = await api('/api/v1/holds', {
      method: 'POST',
      session: quality,
      json: { jobNumbers: jobs, reason: 'Cross-cut class 2 on the traced job; load unverifiable.' },
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.placed.map((p: { jobNumber: string }) => p.jobNumber).sort()).toEqual([...jobs].sort());
    holdIds = Object.fromEntries(r.body.placed.map((p: { jobNumber: string; holdId: number }) => [p.jobNumber, p.holdId]));
    const again = await api('/api/v1/holds', {
      method: 'POST',
      session: quality,
      json: { jobNumbers: [J[0], J[3]], reason: 'Second look.' },
    });
    expect(again.body.alreadyHeld).toEqual([J[0]]);
    expect(again.body.placed.map((p: { jobNumber: string }) => p.jobNumber)).toEqual([J[3]]);
    holdIds[J[3]!] = again.body.placed[0].holdId;
    const tr = await trace(J[0]!);
    expect(tr.job.status).toBe('held');
    expect(tr.job.activeHold.reason).toContain('Cross-cut class 2');
    expect(tr.siblings.find((s: { jobNumber: string }) => s.jobNumber === J[6]).activeHoldId).toBe(holdIds[J[6]!]);
    const { rows } = await pool.query(
      `select count(*)::int as n from audit_log where action = 'hold.place' and entity = 'hold' and entity_id = any($1::text[])`,
      [Object.values(holdIds).map(String)],
    );
    expect(rows[0].n).toBe(6);
  });

  it('refuses unknown jobs, a missing reason, and other roles', async () => {
    const unknown = await api('/api/v1/holds', {
      method: 'POST',
      session: quality,
      json: { jobNumbers: [J[9], `NOPE-${tag()}`], reason: 'x-ray' },
    });
    expect(unknown.status).toBe(400);
    expect(unknown.body.detail).toContain('Unknown job number');
    expect(
      (await pool.query(`select 1 from holds h join jobs j on j.id = h.job_id where j.job_number = $1`, [J[9]])).rowCount,
    ).toBe(0);
    const noReason = await api('/api/v1/holds', { method: 'POST', session: quality, json: { jobNumbers: [J[4]], reason: '' } });
    expect(noReason.status).toBe(400);
    expect(noReason.body.errors[0].path).toBe('reason');
    const op = await api('/api/v1/holds', {
      method: 'POST',
      session: operator,
      json: { jobNumbers: [J[4]], reason: 'not mine' },
    });
    expect(op.status).toBe(403);
  });

  it('a wrong password is a 403 and changes nothing', async () => {
    const ids = [holdIds[J[1]!], holdIds[J[2]!]];
    const r = await api('/api/v1/holds/close', {
      method: 'POST',
      session: quality,
      json: { holdIds: ids, disposition: 'release', comment: '', password: 'not-the-password', meaning: 'approved' },
    });
    expect(r.status).toBe(403);
    expect(r.body.errors[0].path).toBe('password');
    const { rows } = await pool.query<{ status: string; disposition: string | null; signature: unknown; job_status: string }>(
      `select h.status, h.disposition, h.signature, j.status as job_status from holds h join jobs j on j.id = h.job_id where h.id = any($1::int[])`,
      [ids],
    );
    expect(rows).toHaveLength(2);
    for (const h of rows) expect(h).toEqual({ status: 'active', disposition: null, signature: null, job_status: 'held' });
    const failed = await pool.query(
      `select 1 from audit_log where action = 'signature.failed' and actor_label = 'quality' and at > now() - interval '1 minute'`,
    );
    expect(failed.rowCount).toBeGreaterThan(0);
  });

  it('the right password releases with a stored signature; a disposition needs a comment and sets the job', async () => {
    const rel = await api('/api/v1/holds/close', {
      method: 'POST',
      session: quality,
      json: { holdIds: [holdIds[J[12]!]], disposition: 'release', password: TEST_PASSWORD, meaning: 'reviewed' },
    });
    expect(rel.status, JSON.stringify(rel.body)).toBe(200);
    expect(rel.body[0]).toMatchObject({
      status: 'closed',
      disposition: 'release',
      jobStatus: 'released',
      signature: { username: 'quality', meaning: 'reviewed' },
    });
    const noComment = await api('/api/v1/holds/close', {
      method: 'POST',
      session: quality,
      json: { holdIds: [holdIds[J[6]!]], disposition: 'scrap', password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(noComment.status).toBe(400);
    expect(noComment.body.errors[0].path).toBe('comment');
    const scrap = await api('/api/v1/holds/close', {
      method: 'POST',
      session: quality,
      json: {
        holdIds: [holdIds[J[6]!]],
        disposition: 'scrap',
        comment: 'Crazed after boil.',
        password: TEST_PASSWORD,
        meaning: 'approved',
      },
    });
    expect(scrap.body[0]).toMatchObject({
      disposition: 'scrap',
      jobStatus: 'scrapped',
      dispositionComment: 'Crazed after boil.',
    });
    const twice = await api('/api/v1/holds/close', {
      method: 'POST',
      session: quality,
      json: { holdIds: [holdIds[J[6]!]], disposition: 'release', password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(twice.status).toBe(409);
    const audit = await pool.query<{ signature: { username: string; meaning: string } }>(
      `select signature from audit_log where action = 'hold.release' and entity_id = $1`,
      [String(holdIds[J[12]!])],
    );
    expect(audit.rows[0]!.signature).toMatchObject({ username: 'quality', meaning: 'reviewed' });
  });

  it('a nonconformance ties the failed test, the suspected load and the holds; its dispositions are signed', async () => {
    const nc = await api('/api/v1/nonconformances', {
      method: 'POST',
      session: quality,
      json: {
        title: `Adhesion failure ${J[0]}`,
        description: 'Cross-cut class 2.',
        suspectedCause: 'load',
        suspectedLoadId: load1,
        testIds: [failedTestId],
        holdIds: [holdIds[J[0]!], holdIds[J[1]!], holdIds[J[2]!]],
      },
    });
    expect(nc.status, JSON.stringify(nc.body)).toBe(201);
    expect(nc.body).toMatchObject({
      status: 'open',
      suspectedCause: 'load',
      load: { id: load1, verdict: 'unverifiable' },
      activeHolds: 3,
    });
    const passed = await api('/api/v1/quality/tests?result=pass&job=' + J[3], { session: quality });
    const withPass = await api('/api/v1/nonconformances', {
      method: 'POST',
      session: quality,
      json: { title: 'Wrong', testIds: [passed.body[0].id] },
    });
    expect(withPass.status).toBe(400);
    const early = await api(`/api/v1/nonconformances/${nc.body.id}/close`, {
      method: 'POST',
      session: quality,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(early.status).toBe(409);
    const wrong = await api(`/api/v1/nonconformances/${nc.body.id}/dispositions`, {
      method: 'POST',
      session: quality,
      json: {
        holdIds: [holdIds[J[0]!], holdIds[J[1]!], holdIds[J[2]!]],
        disposition: 'recoat',
        comment: 'Strip and re-coat the load.',
        password: 'wrong-one',
        meaning: 'approved',
      },
    });
    expect(wrong.status).toBe(403);
    expect((await api(`/api/v1/nonconformances/${nc.body.id}`, { session: viewer })).body.activeHolds).toBe(3);
    const notMine = await api(`/api/v1/nonconformances/${nc.body.id}/dispositions`, {
      method: 'POST',
      session: quality,
      json: {
        holdIds: [holdIds[J[3]!]],
        disposition: 'recoat',
        comment: 'Not on this NC.',
        password: TEST_PASSWORD,
        meaning: 'approved',
      },
    });
    expect(notMine.status).toBe(400);
    const ok = await api(`/api/v1/nonconformances/${nc.body.id}/dispositions`, {
      method: 'POST',
      session: quality,
      json: {
        holdIds: [holdIds[J[0]!], holdIds[J[1]!], holdIds[J[2]!]],
        disposition: 'recoat',
        comment: 'Strip and re-coat the load.',
        password: TEST_PASSWORD,
        meaning: 'approved',
      },
    });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.activeHolds).toBe(0);
    expect(ok.body.dispositions[0]).toMatchObject({
      disposition: 'recoat',
      jobNumbers: [J[0], J[1], J[2]],
      signature: { username: 'quality', meaning: 'approved' },
    });
    expect((await trace(J[0]!)).job.status).toBe('recoat');
    const closed = await api(`/api/v1/nonconformances/${nc.body.id}/close`, {
      method: 'POST',
      session: quality,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(closed.status).toBe(200);
    expect(closed.body).toMatchObject({ status: 'closed', closeSignature: { username: 'quality' } });
  });
});
