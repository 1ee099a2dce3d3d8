/**
 * The audit row commits with the change or not at all, for every audited change of the lab
 * records (loads, dip runs, job import, quality tests and files, holds, nonconformances and
 * their signed dispositions). A failure injected after the change and before the commit
 * (`setBeforeCommitHookForTests`) must leave neither the change nor its audit row; the same call
 * without it must leave both. The core runs here, in the test process, on the test database.
 *
 * Signatures: the signer checks the throwaway person's password against the stored argon2 hash
 * with the product's own `verifyPassword`, as the web layer's signer does.
 */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { initModels, User, type SignatureRecord } from '../../db/models/index.ts';
import { setBeforeCommitHookForTests, type AuditActor } from '../../db/transaction.ts';
import { closeHolds, closeNc, createNc, dispositionNc, placeHolds } from '../../src/lib/core/hold-store.ts';
import { createDipRun, importJobs } from '../../src/lib/core/job-store.ts';
import { addJobsToLoad, closeLoad, openLoad, recomputeLoad } from '../../src/lib/core/load-store.ts';
import { acceptanceSettings, attachTestFile, putAcceptanceSettings, recordTest } from '../../src/lib/core/quality-store.ts';
import { DEFAULT_ACCEPTANCE } from '../../src/lib/shared/quality.ts';
import { verifyPassword } from '../../src/lib/server/passwords.ts';
import { closeTestPool, createThrowawayUser, testPool, type Throwaway } from '../support/accounts.ts';
import { createTestLine, createTestOven, tag, type TestLine, type TestOven } from '../support/trace-fixtures.ts';

let seq: Sequelize;
let pool: pg.Pool;
let oven: TestOven;
let line: TestLine;
let person: Throwaway;
let actor: AuditActor;

const INJECTED = /injected before commit/;
const failBeforeCommit = () =>
  setBeforeCommitHookForTests(() => {
    throw new Error('injected before commit');
  });

const sign = async (): Promise<SignatureRecord> => {
  const u = await User.findByPk(person.id);
  if (!u || !(await verifyPassword(u.passwordHash, person.password))) throw new Error('signature refused');
  return {
    userId: u.id,
    username: u.username,
    displayName: u.displayName,
    meaning: 'approved',
    signedAt: new Date().toISOString(),
  };
};

const count = async (sql: string, args: unknown[]): Promise<number> =>
  (await pool.query<{ n: number }>(`select count(*)::int as n from (${sql}) x`, args)).rows[0]!.n;
const audits = (action: string, where: string, args: unknown[]) =>
  count(`select 1 from audit_log where action = $1 and actor_id = $2 and ${where}`, [action, person.id, ...args]);

beforeAll(async () => {
  seq = createSequelize({ url: inject('stack').databaseUrl, max: 3 });
  initModels(seq);
  pool = testPool();
  oven = await createTestOven(pool);
  line = await createTestLine(pool);
  person = await createThrowawayUser('quality');
  actor = { id: person.id, label: person.username };
});

afterEach(() => setBeforeCommitHookForTests(null));

afterAll(async () => {
  setBeforeCommitHookForTests(null);
  await seq.close();
  await closeTestPool();
});

describe('oven loads: open, scan jobs, close, recompute', () => {
  let loadId: number;
  const jobs = [`AA-${tag()}`, `AA-${tag()}`];

  it('open', async () => {
    const atMs = Date.now() - 3 * 3_600_000;
    const input = { ovenAssetId: oven.id, atMs, by: 'user' as const, userId: person.id };
    failBeforeCommit();
    await expect(openLoad(seq, input, { actor })).rejects.toThrow(INJECTED);
    expect(await count('select 1 from oven_loads where oven_asset_id = $1', [oven.id])).toBe(0);
    expect(await audits('load.open', `(after->>'ovenAssetId')::int = $3`, [oven.id])).toBe(0);
    setBeforeCommitHookForTests(null);
    loadId = (await openLoad(seq, input, { actor })).id;
    expect(await count(`select 1 from oven_loads where id = $1 and status = 'open'`, [loadId])).toBe(1);
    expect(await audits('load.open', 'entity_id = $3', [String(loadId)])).toBe(1);
  });

  it('scan jobs', async () => {
    const input = { jobNumbers: jobs, rackCodes: [], userId: person.id, actor };
    failBeforeCommit();
    await expect(addJobsToLoad(seq, loadId, input)).rejects.toThrow(INJECTED);
    expect(await count('select 1 from load_jobs where load_id = $1', [loadId])).toBe(0);
    expect(await count('select 1 from jobs where job_number = any($1::text[])', [jobs])).toBe(0);
    expect(await audits('load.jobs.add', 'entity_id = $3', [String(loadId)])).toBe(0);
    setBeforeCommitHookForTests(null);
    expect((await addJobsToLoad(seq, loadId, input)).added.sort()).toEqual([...jobs].sort());
    expect(await count('select 1 from load_jobs where load_id = $1', [loadId])).toBe(2);
    expect(await audits('load.jobs.add', 'entity_id = $3', [String(loadId)])).toBe(1);
  });

  it('close', async () => {
    const input = { atMs: Date.now() - 3_600_000, by: 'user' as const, userId: person.id };
    failBeforeCommit();
    await expect(closeLoad(seq, loadId, input, { actor })).rejects.toThrow(INJECTED);
    expect(await count(`select 1 from oven_loads where id = $1 and status = 'open' and record is null`, [loadId])).toBe(1);
    expect(await audits('load.close', 'entity_id = $3', [String(loadId)])).toBe(0);
    setBeforeCommitHookForTests(null);
    const r = await closeLoad(seq, loadId, input, { actor });
    expect(
      await count(`select 1 from oven_loads where id = $1 and status = 'closed' and verdict = $2`, [loadId, r.verdict]),
    ).toBe(1);
    expect(await audits('load.close', `entity_id = $3 and after->>'verdict' = $4`, [String(loadId), r.verdict])).toBe(1);
  });

  it('recompute', async () => {
    const before = (await pool.query<{ c: Date }>('select computed_at as c from oven_loads where id = $1', [loadId])).rows[0]!.c;
    failBeforeCommit();
    await expect(recomputeLoad(seq, loadId, { actor })).rejects.toThrow(INJECTED);
    const still = (await pool.query<{ c: Date }>('select computed_at as c from oven_loads where id = $1', [loadId])).rows[0]!.c;
    expect(still.getTime()).toBe(before.getTime());
    expect(await audits('load.recompute', 'entity_id = $3', [String(loadId)])).toBe(0);
    setBeforeCommitHookForTests(null);
    await recomputeLoad(seq, loadId, { actor });
    const after = (await pool.query<{ c: Date }>('select computed_at as c from oven_loads where id = $1', [loadId])).rows[0]!.c;
    expect(after.getTime()).toBeGreaterThan(before.getTime());
    expect(await audits('load.recompute', 'entity_id = $3', [String(loadId)])).toBe(1);
  });
});

describe('dip runs, job import, quality tests and files, holds and nonconformances', () => {
  const dipped = [`BB-${tag()}`, `BB-${tag()}`, `BB-${tag()}`];
  let testId: number;
  let holdIds: number[] = [];
  let ncId: number;

  it('a dip run', async () => {
    const input = {
      lineAssetId: line.id,
      dippedAtMs: Date.now() - 3_600_000,
      rackCode: `R-${tag()}`,
      jobNumbers: dipped,
      source: 'api' as const,
      userId: person.id,
    };
    failBeforeCommit();
    await expect(createDipRun(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count('select 1 from dip_runs where line_asset_id = $1', [line.id])).toBe(0);
    expect(await count('select 1 from jobs where job_number = any($1::text[])', [dipped])).toBe(0);
    expect(await audits('dip.record', `(after->>'lineAssetId')::int = $3`, [line.id])).toBe(0);
    setBeforeCommitHookForTests(null);
    const r = await createDipRun(seq, input, actor);
    expect(await count('select 1 from dip_run_jobs where dip_run_id = $1', [r.id])).toBe(3);
    expect(await audits('dip.record', 'entity_id = $3', [String(r.id)])).toBe(1);
  });

  it('a job import', async () => {
    const good = [`CC-${tag()}`, `CC-${tag()}`].map((jobNumber, i) => ({
      line: i + 2,
      jobNumber,
      customerRef: null,
      lensMaterial: null,
      rackCode: null,
    }));
    const sha256 = tag().repeat(8);
    const input = { good, skippedLines: [], sha256 };
    const numbers = good.map((g) => g.jobNumber);
    failBeforeCommit();
    await expect(importJobs(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count('select 1 from jobs where job_number = any($1::text[])', [numbers])).toBe(0);
    expect(await audits('jobs.import', 'entity_id = $3', [sha256.slice(0, 16)])).toBe(0);
    setBeforeCommitHookForTests(null);
    expect((await importJobs(seq, input, actor)).created).toBe(2);
    expect(await count('select 1 from jobs where job_number = any($1::text[])', [numbers])).toBe(2);
    expect(await audits('jobs.import', 'entity_id = $3', [sha256.slice(0, 16)])).toBe(1);
  });

  it('a quality test', async () => {
    // 30 % of the lattice removed: ISO 2409 class 3 or worse, a fail under the default acceptance.
    const input = {
      test: { kind: 'crosscut' as const, jobNumber: dipped[0]!, percentRemoved: 30 },
      testedAtMs: Date.now() - 60_000,
      userId: person.id,
      userLabel: person.username,
    };
    const jobTests = `select 1 from quality_tests t join jobs j on j.id = t.job_id where j.job_number = $1`;
    failBeforeCommit();
    await expect(recordTest(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count(jobTests, [dipped[0]])).toBe(0);
    expect(await audits('test.record', `after->>'jobNumber' = $3`, [dipped[0]])).toBe(0);
    setBeforeCommitHookForTests(null);
    const r = await recordTest(seq, input, actor);
    expect(r.result).toBe('fail');
    testId = r.id;
    expect(await count(jobTests, [dipped[0]])).toBe(1);
    expect(await audits('test.record', 'entity_id = $3', [String(testId)])).toBe(1);
  });

  it('a file attached to the test', async () => {
    const input = { testId, name: 'note.txt', bytes: new TextEncoder().encode('Lattice photo taken.\n'), userId: person.id };
    failBeforeCommit();
    await expect(attachTestFile(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count('select 1 from test_files where test_id = $1', [testId])).toBe(0);
    expect(await audits('test.file.attach', 'entity_id = $3', [String(testId)])).toBe(0);
    setBeforeCommitHookForTests(null);
    await attachTestFile(seq, input, actor);
    expect(await count('select 1 from test_files where test_id = $1', [testId])).toBe(1);
    expect(await audits('test.file.attach', 'entity_id = $3', [String(testId)])).toBe(1);
  });

  it('holds placed', async () => {
    const input = { jobNumbers: dipped, reason: 'Cross-cut failure on the rack.', userId: person.id };
    const held = `select 1 from holds h join jobs j on j.id = h.job_id where j.job_number = any($1::text[])`;
    failBeforeCommit();
    await expect(placeHolds(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count(held, [dipped])).toBe(0);
    expect(await count(`select 1 from jobs where job_number = any($1::text[]) and status = 'held'`, [dipped])).toBe(0);
    expect(await audits('hold.place', `after->>'jobNumber' = any($3::text[])`, [dipped])).toBe(0);
    setBeforeCommitHookForTests(null);
    holdIds = (await placeHolds(seq, input, actor)).placed.map((p) => p.holdId);
    expect(holdIds).toHaveLength(3);
    expect(await count(`select 1 from jobs where job_number = any($1::text[]) and status = 'held'`, [dipped])).toBe(3);
    expect(await audits('hold.place', 'entity_id = any($3::text[])', [holdIds.map(String)])).toBe(3);
  });

  it('a hold released with a signature (and a refused signature changes nothing)', async () => {
    const input = { holdIds: [holdIds[2]!], disposition: 'release' as const, comment: '', userId: person.id };
    const refused = async (): Promise<SignatureRecord> => {
      throw new Error('signature refused');
    };
    await expect(closeHolds(seq, input, refused, actor)).rejects.toThrow('signature refused');
    failBeforeCommit();
    await expect(closeHolds(seq, input, sign, actor)).rejects.toThrow(INJECTED);
    expect(await count(`select 1 from holds where id = $1 and status = 'active' and signature is null`, [holdIds[2]])).toBe(1);
    expect(await audits('hold.release', 'entity_id = $3', [String(holdIds[2])])).toBe(0);
    setBeforeCommitHookForTests(null);
    await closeHolds(seq, input, sign, actor);
    expect(await count(`select 1 from holds where id = $1 and status = 'closed' and disposition = 'release'`, [holdIds[2]])).toBe(
      1,
    );
    expect(
      await audits('hold.release', `entity_id = $3 and signature->>'username' = $4`, [String(holdIds[2]), person.username]),
    ).toBe(1);
  });

  it('a nonconformance', async () => {
    const title = `Adhesion failure ${tag()}`;
    const input = {
      title,
      description: 'Cross-cut class 3.',
      suspectedCause: 'bath' as const,
      testIds: [testId],
      holdIds: holdIds.slice(0, 2),
      userId: person.id,
    };
    failBeforeCommit();
    await expect(createNc(seq, input, actor)).rejects.toThrow(INJECTED);
    expect(await count('select 1 from nonconformances where title = $1', [title])).toBe(0);
    expect(await count('select 1 from holds where id = any($1::int[]) and nc_id is not null', [holdIds])).toBe(0);
    expect(await audits('nc.create', `after->>'title' = $3`, [title])).toBe(0);
    setBeforeCommitHookForTests(null);
    ncId = await createNc(seq, input, actor);
    expect(await count('select 1 from nc_tests where nc_id = $1', [ncId])).toBe(1);
    expect(await count('select 1 from holds where nc_id = $1', [ncId])).toBe(2);
    expect(await audits('nc.create', 'entity_id = $3', [String(ncId)])).toBe(1);
  });

  it('a signed disposition of the nonconformance’s holds', async () => {
    const input = { holdIds: holdIds.slice(0, 2), disposition: 'scrap' as const, comment: 'Crazed.', userId: person.id };
    failBeforeCommit();
    await expect(dispositionNc(seq, ncId, input, sign, actor)).rejects.toThrow(INJECTED);
    expect(await count(`select 1 from holds where nc_id = $1 and status = 'active'`, [ncId])).toBe(2);
    expect(await count('select 1 from nc_dispositions where nc_id = $1', [ncId])).toBe(0);
    expect(await audits('nc.disposition', 'entity_id = $3', [String(ncId)])).toBe(0);
    expect(await audits('hold.disposition', 'entity_id = any($3::text[])', [holdIds.map(String)])).toBe(0);
    setBeforeCommitHookForTests(null);
    await dispositionNc(seq, ncId, input, sign, actor);
    expect(await count(`select 1 from holds where nc_id = $1 and status = 'closed' and disposition = 'scrap'`, [ncId])).toBe(2);
    expect(await count(`select 1 from jobs where job_number = any($1::text[]) and status = 'scrapped'`, [dipped])).toBe(2);
    expect(await count('select 1 from nc_dispositions where nc_id = $1', [ncId])).toBe(1);
    expect(await audits('nc.disposition', `entity_id = $3 and signature is not null`, [String(ncId)])).toBe(1);
    expect(await audits('hold.disposition', 'entity_id = any($3::text[])', [holdIds.map(String)])).toBe(2);
  });

  it('a signed close of the nonconformance', async () => {
    const input = { comment: 'Bath replaced.', userId: person.id };
    failBeforeCommit();
    await expect(closeNc(seq, ncId, input, sign, actor)).rejects.toThrow(INJECTED);
    expect(await count(`select 1 from nonconformances where id = $1 and status = 'open'`, [ncId])).toBe(1);
    expect(await audits('nc.close', 'entity_id = $3', [String(ncId)])).toBe(0);
    setBeforeCommitHookForTests(null);
    await closeNc(seq, ncId, input, sign, actor);
    expect(
      await count(`select 1 from nonconformances where id = $1 and status = 'closed' and close_signature is not null`, [ncId]),
    ).toBe(1);
    expect(await audits('nc.close', 'entity_id = $3', [String(ncId)])).toBe(1);
    // Closed once: a second close is refused before anyone signs.
    await expect(closeNc(seq, ncId, input, sign, actor)).rejects.toMatchObject({ kind: 'conflict' });
  });
});

describe('acceptance settings', () => {
  it('a change of the settings', async () => {
    const changed = { ...DEFAULT_ACCEPTANCE, thicknessUm: { min: 1.6, max: 3.9 } };
    const settingAudits = () => audits('settings.acceptance', `entity_id = 'acceptance'`, []);
    const n = await settingAudits();
    const before = await acceptanceSettings(seq);
    failBeforeCommit();
    await expect(putAcceptanceSettings(seq, changed, actor)).rejects.toThrow(INJECTED);
    expect(await acceptanceSettings(seq)).toEqual(before);
    expect(await settingAudits()).toBe(n);
    setBeforeCommitHookForTests(null);
    try {
      await putAcceptanceSettings(seq, changed, actor);
      expect((await acceptanceSettings(seq)).thicknessUm).toEqual({ min: 1.6, max: 3.9 });
      expect(await settingAudits()).toBe(n + 1);
    } finally {
      await putAcceptanceSettings(seq, before, actor);
    }
  });
});
