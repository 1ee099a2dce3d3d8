/**
 * Scale-out (README "Scale-out"): Debian's mosquitto as the external broker (started here on
 * a free loopback port with a generated configuration and password file), two ingest workers
 * pointed at it by MQTT_URL on one shared subscription (INGEST_SHARED_GROUP → `$share/…`):
 * every published reading is stored exactly once and both workers took part of the stream.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPool } from '../../db/connection.ts';
import { freePort } from '../../db/pg-control.ts';
import { root } from '../support/test-stack.ts';
import {
  SERVICE_PASSWORD,
  connectDevice,
  countReadings,
  createTestDevice,
  portOpen,
  publishSeries,
  startOwnWorker,
  waitFor,
  type Child,
  type TestDevice,
} from '../support/ingest-harness.ts';

const MOSQUITTO = '/usr/sbin/mosquitto';
const dir = path.join(root, 'var', `test-ingest-mosquitto-${process.pid}`);
const ids = [`scale-a-${process.pid}`, `scale-b-${process.pid}`];
let pool: pg.Pool;
let dbUrl: string;
let port: number;
let mosquitto: ChildProcess;
let mosquittoLog = '';
const workers: Child[] = [];
let dev: TestDevice;

beforeAll(async () => {
  dbUrl = inject('stack').databaseUrl;
  pool = createPool({ url: dbUrl, max: 2 });
  dev = await createTestDevice(pool, [{ key: 'shared', unit: 'mm/s', min: 0, max: 100 }], 'mq');
  fs.mkdirSync(dir, { recursive: true });
  fs.chmodSync(dir, 0o755);
  port = await freePort();
  const passwd = path.join(dir, 'passwd');
  fs.writeFileSync(passwd, '');
  execFileSync('mosquitto_passwd', ['-b', passwd, 'svc-ingest', SERVICE_PASSWORD]);
  execFileSync('mosquitto_passwd', ['-b', passwd, dev.username, dev.password]);
  fs.chmodSync(passwd, 0o644);
  const conf = path.join(dir, 'mosquitto.conf');
  fs.writeFileSync(
    conf,
    [
      `listener ${port} 127.0.0.1`,
      'allow_anonymous false',
      `password_file ${passwd}`,
      'persistence false',
      // The workers acknowledge after commit: let enough messages be in flight per worker.
      'max_inflight_messages 1000',
      'max_queued_messages 100000',
      'log_dest stderr',
      'log_type error',
      'log_type warning',
      '',
    ].join('\n'),
  );
  mosquitto = spawn(MOSQUITTO, ['-c', conf], { stdio: ['ignore', 'pipe', 'pipe'] });
  mosquitto.stderr?.on('data', (b: Buffer) => (mosquittoLog += b.toString()));
  await waitFor(async () => portOpen(port), 10_000, `mosquitto on port ${port}`).catch((e: Error) => {
    throw new Error(`${e.message}\n${mosquittoLog}`);
  });
  for (const id of ids) {
    workers.push(
      await startOwnWorker(
        {
          databaseUrl: dbUrl,
          mqttUrl: `mqtt://127.0.0.1:${port}`,
          workerId: id,
          journalDir: path.join(dir, 'journal'),
          extra: { INGEST_SHARED_GROUP: 'coatrail-ingest' },
        },
        dir,
      ),
    );
  }
}, 60_000);

afterAll(async () => {
  for (const w of workers) await w.stop();
  if (mosquitto && mosquitto.exitCode === null) {
    mosquitto.kill('SIGTERM');
    await new Promise((r) => mosquitto.once('exit', r));
  }
  await pool?.query('delete from ingest_status where worker_id = any($1)', [ids]).catch(() => {});
  await pool?.end();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('two workers on a shared subscription behind mosquitto', () => {
  it('stores each of 2 000 readings exactly once, and both workers take part', async () => {
    const ch = dev.channels['shared']!;
    const n = 2000;
    const t0 = Date.now() - 4 * 3_600_000;
    const client = await connectDevice(port, dev.username, dev.password);
    await publishSeries(client, ch.topic, n, { t0, perSecond: 2000 });
    await client.endAsync();
    await waitFor(async () => (await countReadings(pool, ch.id)) >= n, 20_000, `${n} readings`);
    expect(await countReadings(pool, ch.id)).toBe(n);
    const { rows: dup } = await pool.query<{ n: number }>(`select count(*)::int as n from ingest_rejections where topic = $1`, [
      ch.topic,
    ]);
    expect(dup[0]!.n).toBe(0); // no message reached both workers
    // Each worker's share, from its heartbeat (committed rows; reported every second).
    const shares = await waitFor(
      async () => {
        const { rows } = await pool.query<{ worker_id: string; committed: number }>(
          'select worker_id, committed from ingest_status where worker_id = any($1) order by worker_id',
          [ids],
        );
        return rows.length === 2 && rows[0]!.committed + rows[1]!.committed === n ? rows : null;
      },
      10_000,
      'both heartbeats to count the stream',
    );
    for (const s of shares) expect(s.committed).toBeGreaterThan(0);
  }, 60_000);
});
