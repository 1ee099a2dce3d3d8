/**
 * PostgreSQL stops mid-stream and comes back: the worker keeps accepting messages into its
 * bounded buffer, spills to its journal when the buffer is full (a 200-row buffer here, so the
 * journal is certainly used), and when the database returns stores every reading exactly
 * once, in one piece, with rollups that count each once. Runs on a throwaway cluster of its own
 * (db/pg-control.ts in var/), with its own broker and worker.
 */
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createPool, createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
import { root } from '../support/test-stack.ts';
import {
  connectDevice,
  countReadings,
  createTestDevice,
  publishSeries,
  startOwnBroker,
  startOwnWorker,
  waitFor,
  type Child,
  type OwnBroker,
} from '../support/ingest-harness.ts';

const dir = path.join(root, 'var', `test-ingest-pg-${process.pid}`);
const pgDir = path.join(dir, 'pg');
const journalDir = path.join(dir, 'journal');
let url: string;
let pool: pg.Pool;
let broker: OwnBroker;
let worker: Child;

beforeAll(async () => {
  fs.rmSync(dir, { recursive: true, force: true });
  const saved = process.env['DATABASE_URL'];
  delete process.env['DATABASE_URL'];
  try {
    url = (await startLocalPostgres({ baseDir: pgDir, database: 'outage' })).url;
  } finally {
    if (saved) process.env['DATABASE_URL'] = saved;
  }
  const seq = createSequelize({ url, max: 1 });
  await migrateUp(seq);
  await seq.close();
  pool = createPool({ url, max: 2 });
  await pool.query(`insert into sites(code, name, time_zone) values ('fernhollow', 'Outage test site', 'Europe/London')`);
  broker = await startOwnBroker(url, dir);
  worker = await startOwnWorker(
    {
      databaseUrl: url,
      mqttUrl: `mqtt://127.0.0.1:${broker.port}`,
      workerId: 'outage',
      journalDir,
      extra: { INGEST_BUFFER_ROWS: '200' },
    },
    dir,
  );
}, 90_000);

afterAll(async () => {
  await worker?.stop();
  await broker?.stop();
  await pool?.end().catch(() => {});
  await stopLocalPostgres(pgDir).catch(() => {});
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('PostgreSQL outage', () => {
  it('buffers, journals and replays: every reading stored exactly once', async () => {
    const dev = await createTestDevice(pool, [{ key: 'v', unit: '°C', min: -20, max: 300 }], 'pg');
    const ch = dev.channels['v']!;
    const client = await connectDevice(broker.port, dev.username, dev.password);
    const n = 3000;
    const t0 = Date.now() - 3 * 3_600_000;
    const journalFiles = () =>
      fs.existsSync(path.join(journalDir, 'outage'))
        ? fs.readdirSync(path.join(journalDir, 'outage')).filter((f) => f.endsWith('.jsonl')).length
        : 0;
    const value = (i: number) => 20 + (i % 100) / 10;
    // 800 readings with the database up, then it stops, then 2 200 more while it is down.
    await publishSeries(client, ch.topic, 800, { t0, perSecond: 1000, value });
    await stopLocalPostgres(pgDir);
    await publishSeries(client, ch.topic, n - 800, { t0: t0 + 800_000, perSecond: 1000, value: (i) => value(i + 800) });
    // More than the 200-row buffer arrived while the database was down: the rest is in the journal.
    await waitFor(async () => journalFiles() > 0, 10_000, 'the journal to be written').catch((e) => {
      console.log(worker.log());
      throw e;
    });
    expect(worker.log()).toContain('spilling to the journal');

    const saved = process.env['DATABASE_URL'];
    delete process.env['DATABASE_URL'];
    try {
      await startLocalPostgres({ baseDir: pgDir, database: 'outage' });
    } finally {
      if (saved) process.env['DATABASE_URL'] = saved;
    }
    const stored = await waitFor(
      async () => {
        const c = await countReadings(pool, ch.id);
        return c >= n ? c : null;
      },
      40_000,
      `${n} readings after the outage`,
      250,
    );
    expect(stored).toBe(n);
    const { rows } = await pool.query<{ n: number; m: number; h: number }>(
      `select count(distinct ts)::int as n, (select sum(n)::int from readings_1m where channel_id = $1) as m,
              (select sum(n)::int from readings_1h where channel_id = $1) as h
         from readings where channel_id = $1`,
      [ch.id],
    );
    expect(rows[0]).toEqual({ n, m: n, h: n });
    // The journal is replayed and removed.
    await waitFor(async () => journalFiles() === 0, 10_000, 'the journal to empty');
    expect(worker.proc.exitCode).toBeNull();
    await client.endAsync();
  }, 120_000);
});
