/**
 * Crashes and restarts, on a broker and worker of this test's own (child processes on free
 * loopback ports, against the test database; the global stack's worker listens to the global
 * broker only and never sees these messages):
 * - the worker killed with SIGKILL mid-stream and restarted: every published reading is stored
 *   exactly once (the broker redelivers what the dead worker had not acknowledged; what it had
 *   committed but not acknowledged is refused as a duplicate), and the rollups count each once;
 * - the broker restarted: the worker reconnects by itself and ingest continues.
 */
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPool } from '../../db/connection.ts';
import { root } from '../support/test-stack.ts';
import {
  connectDevice,
  countReadings,
  createTestDevice,
  publishSeries,
  sleep,
  startOwnBroker,
  startOwnWorker,
  waitFor,
  type Child,
  type OwnBroker,
  type TestDevice,
} from '../support/ingest-harness.ts';

const dir = path.join(root, 'var', `test-ingest-resilience-${process.pid}`);
const workerId = `resilience-${process.pid}`;
let pool: pg.Pool;
let dbUrl: string;
let broker: OwnBroker;
let worker: Child;
let dev: TestDevice;

const workerEnv = () => ({
  databaseUrl: dbUrl,
  mqttUrl: `mqtt://127.0.0.1:${broker.port}`,
  workerId,
  journalDir: path.join(dir, 'journal'),
});

beforeAll(async () => {
  dbUrl = inject('stack').databaseUrl;
  pool = createPool({ url: dbUrl, max: 2 });
  dev = await createTestDevice(
    pool,
    [
      { key: 'kill', unit: 'mm/s', min: 0, max: 100 },
      { key: 'restart', unit: 'mm/s', min: 0, max: 100 },
      { key: 'term', unit: 'mm/s', min: 0, max: 100 },
    ],
    'res',
  );
  broker = await startOwnBroker(dbUrl, dir);
  worker = await startOwnWorker(workerEnv(), dir);
}, 60_000);

afterAll(async () => {
  await worker?.stop();
  await broker?.stop();
  await pool?.query('delete from ingest_status where worker_id = $1', [workerId]).catch(() => {});
  await pool?.end();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('worker crash', () => {
  it('stores every reading exactly once after a SIGKILL mid-stream and a restart', async () => {
    const ch = dev.channels['kill']!;
    const n = 3000;
    const t0 = Date.now() - 2 * 3_600_000; // 1 reading per second, the last one well in the past
    const client = await connectDevice(broker.port, dev.username, dev.password);
    let killedAt = -1;
    let restarted: Promise<Child> | null = null;
    await publishSeries(client, ch.topic, n, {
      t0,
      perSecond: 1500,
      onProgress: (i) => {
        if (i === 1200) {
          killedAt = i;
          worker.proc.kill('SIGKILL');
          restarted = sleep(300).then(() => startOwnWorker(workerEnv(), dir));
        }
      },
    });
    expect(killedAt).toBe(1200);
    worker = await restarted!;
    const stored = await waitFor(
      async () => {
        const c = await countReadings(pool, ch.id);
        return c >= n ? c : null;
      },
      30_000,
      `${n} readings`,
    );
    expect(stored).toBe(n);
    const { rows } = await pool.query<{ n: number; first: number; last: number; m: number }>(
      `select count(distinct ts)::int as n, min(extract(epoch from ts) * 1000)::float8 as first, max(extract(epoch from ts) * 1000)::float8 as last,
              (select sum(n)::int from readings_1m where channel_id = $1) as m
         from readings where channel_id = $1`,
      [ch.id],
    );
    expect(rows[0]).toEqual({ n, first: t0, last: t0 + (n - 1) * 1000, m: n });
    // The restarted worker took up its persistent session (the broker had kept its messages).
    expect(worker.log()).toContain('(session resumed)');
    await client.endAsync();
  }, 60_000);
});

describe('clean shutdown', () => {
  it('on SIGTERM flushes what it holds, exits 0, and the next run loses nothing', async () => {
    const ch = dev.channels['term']!;
    const n = 2000;
    const t0 = Date.now() - 5 * 3_600_000;
    const client = await connectDevice(broker.port, dev.username, dev.password);
    let stopped: Promise<void> | null = null;
    let restarted: Promise<Child> | null = null;
    await publishSeries(client, ch.topic, n, {
      t0,
      perSecond: 2000,
      onProgress: (i) => {
        if (i === 700) {
          const old = worker;
          stopped = old.stop('SIGTERM');
          restarted = stopped.then(() => {
            expect(old.proc.exitCode).toBe(0);
            return startOwnWorker(workerEnv(), dir);
          });
        }
      },
    });
    worker = await restarted!;
    await waitFor(async () => (await countReadings(pool, ch.id)) >= n, 30_000, `${n} readings`);
    expect(await countReadings(pool, ch.id)).toBe(n);
    // Everything committed before the stop was acknowledged: nothing came back as a duplicate.
    const { rows } = await pool.query<{ n: number }>('select count(*)::int as n from ingest_rejections where topic = $1', [
      ch.topic,
    ]);
    expect(rows[0]!.n).toBe(0);
    await client.endAsync();
  }, 60_000);
});

describe('broker restart', () => {
  it('the worker reconnects by itself and ingest continues', async () => {
    const ch = dev.channels['restart']!;
    const t0 = Date.now() - 3_600_000;
    let client = await connectDevice(broker.port, dev.username, dev.password);
    await publishSeries(client, ch.topic, 200, { t0 });
    await waitFor(async () => (await countReadings(pool, ch.id)) === 200, 15_000, 'the first 200 readings');
    await client.endAsync();

    const connectsBefore = worker.log().split('connected to').length;
    await broker.stop('SIGKILL');
    broker = await startOwnBroker(dbUrl, dir, broker.port);
    await waitFor(async () => worker.log().split('connected to').length > connectsBefore, 20_000, 'the worker to reconnect');

    client = await connectDevice(broker.port, dev.username, dev.password);
    await publishSeries(client, ch.topic, 200, { t0: t0 + 200_000 });
    await waitFor(async () => (await countReadings(pool, ch.id)) === 400, 15_000, 'the next 200 readings');
    await client.endAsync();
    expect(worker.proc.exitCode).toBeNull();
  }, 60_000);
});
