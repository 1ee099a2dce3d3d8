/**
 * The heartbeat (ingest/health-reporter.ts) on the test stack's PostgreSQL: one row per
 * worker, the database's own clock, running counts that add up across beats (a sum that must
 * equal what was counted), and the last commit kept while a new run has not committed yet.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createSequelize } from '../../db/connection.ts';
import { initModels } from '../../db/models/index.ts';
import { HealthReporter, type HealthSnapshot } from '../../ingest/health-reporter.ts';
import { closeTestPool, testPool } from '../support/accounts.ts';

let sequelize: Sequelize;
const workerId = `hb-test-${process.pid}-${Date.now()}`;

beforeAll(() => {
  sequelize = createSequelize({ url: inject('stack').databaseUrl, max: 2 });
  initModels(sequelize);
});

afterAll(async () => {
  await testPool().query('delete from ingest_status where worker_id = $1', [workerId]);
  await sequelize?.close();
  await closeTestPool();
});

const row = async () =>
  (
    await testPool().query<{
      committed: number;
      rejected: number;
      last: number | null;
      lag_ms: number;
      buffered: number;
      age: number;
    }>(
      `select committed::int, rejected::int, (extract(epoch from last_commit_at) * 1000)::float8 as last, lag_ms, buffered,
              extract(epoch from now() - heartbeat_at)::float8 as age
         from ingest_status where worker_id = $1`,
      [workerId],
    )
  ).rows[0];

describe('HealthReporter', () => {
  it('writes one row per worker whose counts add up across beats and whose last commit survives a restart', async () => {
    const snap: HealthSnapshot = { lastCommitAt: null, lagMs: 12, buffered: 3, journalBytes: 0 };
    const first = new HealthReporter(sequelize, workerId, () => snap);
    expect(await first.beat()).toBe(true);
    expect(await row()).toMatchObject({ committed: 0, rejected: 0, last: null, lag_ms: 12, buffered: 3 });
    const commitAt = Date.now() - 5000;
    snap.lastCommitAt = commitAt;
    first.counted(10, 1);
    first.counted(5, 0);
    expect(await first.beat()).toBe(true);
    first.counted(7, 2);
    expect(await first.beat()).toBe(true);
    const after = await row();
    expect(after).toMatchObject({ committed: 22, rejected: 3, last: commitAt });
    expect(after!.age).toBeGreaterThanOrEqual(0); // the database's clock on both sides
    // A new run of the same worker that has not committed yet keeps the last commit and the counts.
    const second = new HealthReporter(sequelize, workerId, () => ({
      lastCommitAt: null,
      lagMs: 0,
      buffered: 0,
      journalBytes: 0,
    }));
    expect(await second.beat()).toBe(true);
    expect(await row()).toMatchObject({ committed: 22, rejected: 3, last: commitAt, buffered: 0 });
  });
});
