/**
 * `npm run bench:ingest`: the telemetry pipeline's throughput and latency on loopback, with
 * the two limits it is measured against, all in one run on one machine:
 *
 *   1. broker limit   — publisher → aedes broker → plain subscriber (QoS 1, no database), once
 *                       with a clean session and once with a persistent session like the worker's
 *   2. COPY limit     — binary COPY of rows straight into the readings table (pg-copy-streams)
 *   3. single samples — N one-sample messages (QoS 1) → broker → worker → committed
 *   4. batches        — N samples in messages of BATCH samples → committed
 *   5. paced          — single-sample messages at 5 000 readings/s for PACED_S seconds
 *
 * It starts a throwaway PostgreSQL (db/pg-control.ts, in var/bench-ingest), the product's
 * broker (ingest/broker-main.ts) and the worker or subscriber (tests/bench/ingest-child.ts)
 * as separate processes, and stops them all at the end. Each of the two MQTT phases starts
 * after 10 000 unmeasured warm-up messages. Latency is publish → commit: the
 * publisher sets each sample's time to its publish time and a post-commit handler in the
 * worker process records commit time − sample time. Environment: BENCH_N (default 100 000),
 * BENCH_BATCH (500), BENCH_PACED_S (10), INGEST_FLUSH_MS (the worker's, default 20),
 * BENCH_HANDLERS=none (the pipeline without the product's post-commit handlers).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { Readable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import mqtt, { type MqttClient } from 'mqtt';
import { from as copyFrom } from 'pg-copy-streams';
import { createPool, createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { freePort, startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
import { Batch } from '../../ingest/batch.ts';
import { copyBinary } from '../../ingest/store.ts';
import { hashPassword } from '../../src/lib/server/passwords.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const dir = path.join(root, 'var', 'bench-ingest');
const N = Number(process.env['BENCH_N'] ?? 100_000);
const BATCH = Number(process.env['BENCH_BATCH'] ?? 500);
const PACED_S = Number(process.env['BENCH_PACED_S'] ?? 10);
const PACED_RATE = 5000;
const CHANNELS = 200;
const WARM_UP = 10_000;
const SERVICE_PW = 'bench-service-password';
const DEVICE_PW = 'bench-device-password';
const say = (s: string) => console.log(`[bench] ${s}`);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

interface Done {
  done: true;
  count: number;
  lastMs: number;
  p50: number;
  p99: number;
  max: number;
  cpuMs: number;
}

const children: ChildProcess[] = [];

function child(args: string[], env: NodeJS.ProcessEnv, ipc: boolean): ChildProcess {
  const log = fs.openSync(path.join(dir, `${path.basename(args[args.length - 1]!)}-${children.length}.log`), 'a');
  const p = spawn(process.execPath, ['--import', 'tsx', ...args], {
    cwd: root,
    env,
    stdio: ['ignore', log, log, ...(ipc ? (['ipc'] as const) : [])],
  });
  children.push(p);
  return p;
}

function nextMessage<T>(p: ChildProcess, pred: (m: any) => boolean, timeoutMs: number, what: string): Promise<T> {
  return new Promise((resolve, reject) => {
    const t = setTimeout(() => {
      p.off('message', on);
      reject(new Error(`timed out waiting for ${what}`));
    }, timeoutMs);
    const on = (m: any) => {
      if (pred(m)) {
        clearTimeout(t);
        p.off('message', on);
        resolve(m as T);
      }
    };
    p.on('message', on);
  });
}

async function stopChild(p: ChildProcess) {
  if (p.exitCode !== null || p.signalCode !== null) return;
  p.kill('SIGTERM');
  const until = Date.now() + 10_000;
  while (p.exitCode === null && p.signalCode === null && Date.now() < until) await sleep(50);
  if (p.exitCode === null && p.signalCode === null) p.kill('SIGKILL');
}

/** Publish with QoS 1 keeping at most `window` messages awaiting their PUBACK. */
async function publishAll(
  client: MqttClient,
  count: number,
  make: (i: number) => [string, string],
  opts: { window?: number; rate?: number } = {},
): Promise<number> {
  const window = opts.window ?? 2000;
  let outstanding = 0;
  let wake: (() => void) | null = null;
  const started = Date.now();
  for (let i = 0; i < count; i++) {
    if (opts.rate) {
      const due = started + (i * 1000) / opts.rate;
      const wait = due - Date.now();
      if (wait > 1) await sleep(wait);
    }
    while (outstanding >= window) await new Promise<void>((r) => (wake = r));
    const [topic, payload] = make(i);
    outstanding++;
    client.publish(topic, payload, { qos: 1 }, () => {
      outstanding--;
      const w = wake;
      wake = null;
      w?.();
    });
  }
  while (outstanding > 0) await new Promise<void>((r) => (wake = r));
  return started;
}

async function main() {
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  const loadAtStart = os.loadavg()[0]!;
  say(
    `N = ${N.toLocaleString('en-GB')} readings, batches of ${BATCH}, ${CHANNELS} channels, paced ${PACED_RATE}/s for ${PACED_S} s`,
  );
  const saved = process.env['DATABASE_URL'];
  delete process.env['DATABASE_URL'];
  const pgh = await startLocalPostgres({ baseDir: path.join(dir, 'pg'), database: 'bench' });
  if (saved) process.env['DATABASE_URL'] = saved;
  const seq = createSequelize({ url: pgh.url, max: 1 });
  await migrateUp(seq);
  await seq.close();
  const pool = createPool({ url: pgh.url, max: 2 });
  const { rows: site } = await pool.query<{ id: number }>(
    `insert into sites(code, name) values ('bench', 'Bench site') returning id`,
  );
  const { rows: dev } = await pool.query<{ id: number }>(
    `insert into devices(site_id, name, username, password_hash, topic_prefix) values ($1, 'Bench gateway', 'gw-bench', $2, 'coatrail/v1/bench/gw-bench') returning id`,
    [site[0]!.id, await hashPassword(DEVICE_PW)],
  );
  const { rows: asset } = await pool.query<{ id: number }>(
    `insert into assets(site_id, kind, code, name) values ($1, 'tank', 'tank-1', 'Bench tank') returning id`,
    [site[0]!.id],
  );
  await pool.query(
    `insert into channels(asset_id, device_id, key, name, kind, unit, min, max)
     select $1, $2, 'c' || g, 'Bench ' || g, 'other', 'mm/s', 0, 1000 from generate_series(1, ${CHANNELS + 1}) g`,
    [asset[0]!.id, dev[0]!.id],
  );
  const { rows: chans } = await pool.query<{ id: number; key: string }>('select id, key from channels order by id');
  // The worker's daily retention job would otherwise start a minute in, inside a measurement.
  await pool.query(`insert into site_settings(key, value) values ('retentionLastRun', $1::jsonb)`, [
    JSON.stringify({ atMs: Date.now() }),
  ]);
  const topicOf = (k: number) => `coatrail/v1/bench/gw-bench/tank-1/c${(k % CHANNELS) + 1}`;
  const copyChannel = chans[chans.length - 1]!.id; // c201: only the COPY limit writes here

  const port = await freePort();
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: pgh.url,
    MQTT_PORT: String(port),
    MQTT_URL: `mqtt://127.0.0.1:${port}`,
    MQTT_SERVICE_PASSWORD: SERVICE_PW,
    INGEST_WORKER_ID: 'bench',
    INGEST_JOURNAL_DIR: path.join(dir, 'journal'),
  };
  child(['ingest/broker-main.ts'], env, false);
  const publisher = await (async () => {
    for (let i = 0; ; i++) {
      try {
        return await mqtt.connectAsync(env['MQTT_URL']!, {
          username: 'gw-bench',
          password: DEVICE_PW,
          clientId: `gw-bench-${process.pid}`,
          protocolVersion: 4,
          reconnectPeriod: 0,
        });
      } catch (e) {
        if (i > 100) throw e;
        await sleep(100);
      }
    }
  })();
  // Unique sample times per channel even when many messages leave within one millisecond.
  const lastT = new Float64Array(CHANNELS);
  const stamp = (k: number) => {
    const c = k % CHANNELS;
    const t = Math.max(Date.now(), lastT[c]! + 1);
    lastT[c] = t;
    return t;
  };
  const single = (i: number): [string, string] => [topicOf(i), `{"t":${stamp(i)},"v":${(i % 1000) / 10}}`];
  /** Unmeasured traffic first, so that every process has compiled its hot paths. */
  const warmUp = async (p: ChildProcess) => {
    p.send({ expect: WARM_UP, time: false });
    const warmed = nextMessage<Done>(p, (m) => m.done, 120_000, 'the warm-up');
    await publishAll(publisher, WARM_UP, single);
    await warmed;
  };

  // 1. Broker limits: a subscriber with a clean session, then one with a persistent session like the worker's.
  const brokerLimit = async (persistent: boolean) => {
    say(`1/5 broker limit: publisher → broker → subscriber (QoS 1, ${persistent ? 'persistent' : 'clean'} session)…`);
    const sub = child(['tests/bench/ingest-child.ts', 'subscriber', ...(persistent ? ['persistent'] : [])], env, true);
    await nextMessage(sub, (m) => m.ready, 30_000, 'the subscriber');
    await warmUp(sub);
    sub.send({ expect: N });
    const done = nextMessage<Done>(sub, (m) => m.done, 300_000, 'the subscriber to receive everything');
    const t0 = await publishAll(publisher, N, single);
    const r = await done;
    await stopChild(sub);
    return { rate: N / ((r.lastMs - t0) / 1000), p50: r.p50, p99: r.p99, cpuUs: (r.cpuMs * 1000) / N };
  };
  const brokerClean = await brokerLimit(false);
  const broker = await brokerLimit(true);

  // 2. COPY limit.
  say('2/5 COPY limit: binary COPY straight into readings…');
  const copyStart = Date.now();
  const client = await pool.connect();
  try {
    // Binary COPY (PostgreSQL's fastest input) in transactions of 10 000 rows, one chunk each.
    const base = Date.now() - 30 * 86_400_000;
    for (let done = 0; done < N; done += 10_000) {
      const rows = Math.min(10_000, N - done);
      const b = new Batch();
      for (let i = 0; i < rows; i++) b.add(copyChannel, base + (done + i) * 1000, (i % 1000) / 10, 0, 0);
      await pipeline(
        Readable.from([copyBinary(b)]),
        client.query(copyFrom('COPY readings(channel_id, ts, value, quality) FROM STDIN (FORMAT binary)')),
      );
    }
  } finally {
    client.release();
  }
  const copy = { rate: N / ((Date.now() - copyStart) / 1000) };

  // 3. Single-sample messages through the worker.
  say('3/5 single-sample messages → worker → committed…');
  const worker = child(['tests/bench/ingest-child.ts', 'worker'], env, true);
  await nextMessage(worker, (m) => m.ready, 30_000, 'the worker');
  await warmUp(worker);
  worker.send({ expect: N });
  let done = nextMessage<Done>(worker, (m) => m.done, 600_000, 'the worker to commit everything');
  let t0 = await publishAll(publisher, N, single);
  let r = await done;
  const singles = { rate: N / ((r.lastMs - t0) / 1000), p50: r.p50, p99: r.p99, cpuUs: (r.cpuMs * 1000) / N };

  // 4. Batches.
  say(`4/5 batches of ${BATCH} samples → worker → committed…`);
  const messages = Math.ceil(N / BATCH);
  worker.send({ expect: messages * BATCH, time: false });
  done = nextMessage<Done>(worker, (m) => m.done, 600_000, 'the worker to commit every batch');
  const bBase = Date.now() - 20 * 86_400_000;
  t0 = await publishAll(
    publisher,
    messages,
    (m) => {
      const samples: string[] = [];
      const c = m % CHANNELS;
      const first = bBase + Math.floor(m / CHANNELS) * BATCH * 1000;
      for (let k = 0; k < BATCH; k++) samples.push(`{"t":${first + k * 1000},"v":${k % 100}}`);
      return [topicOf(c), `{"samples":[${samples.join(',')}]}`];
    },
    { window: 50 },
  );
  r = await done;
  const batched = { rate: (messages * BATCH) / ((r.lastMs - t0) / 1000), cpuUs: (r.cpuMs * 1000) / (messages * BATCH) };

  // 5. Paced.
  say(`5/5 paced: ${PACED_RATE} single-sample readings/s for ${PACED_S} s…`);
  const paced = PACED_RATE * PACED_S;
  worker.send({ expect: paced });
  done = nextMessage<Done>(worker, (m) => m.done, 120_000, 'the paced run');
  await publishAll(publisher, paced, single, { rate: PACED_RATE });
  r = await done;
  const pacedLat = { p50: r.p50, p99: r.p99, max: r.max };

  await publisher.endAsync();
  for (const c of [...children].reverse()) await stopChild(c);
  const { rows: total } = await pool.query<{ n: number }>('select count(*)::int as n from readings');
  await pool.end();
  await stopLocalPostgres(path.join(dir, 'pg'));

  const f = (x: number) => Math.round(x).toLocaleString('en-GB');
  const ms = (x: number) => `${Math.round(x)} ms`;
  const pct = (x: number) => `${Math.round(x * 100)} %`;
  const lines: [string, string, string, string, string][] = [
    ['measurement', 'readings/s', 'p50', 'p99', 'vs. limit (target)'],
    ['broker limit, clean session (QoS 1, no database)', f(brokerClean.rate), ms(brokerClean.p50), ms(brokerClean.p99), ''],
    ['broker limit, persistent session as the worker', f(broker.rate), ms(broker.p50), ms(broker.p99), ''],
    ['COPY limit (binary COPY into readings)', f(copy.rate), '', '', ''],
    [
      'single-sample messages, publish → committed',
      f(singles.rate),
      ms(singles.p50),
      ms(singles.p99),
      `${pct(singles.rate / broker.rate)} of persistent (≥ 80 %); ${pct(singles.rate / brokerClean.rate)} of clean`,
    ],
    [`batches of ${BATCH}, publish → committed`, f(batched.rate), '', '', `${pct(batched.rate / copy.rate)} of COPY (≥ 50 %)`],
    [`paced ${f(PACED_RATE)}/s single samples`, f(PACED_RATE), ms(pacedLat.p50), ms(pacedLat.p99), `p99 ≤ 150 ms`],
  ];
  const widths = lines[0]!.map((_, i) => Math.max(...lines.map((l) => l[i]!.length)));
  console.log('');
  for (const [k, l] of lines.entries()) {
    console.log(l.map((c, i) => (i === 0 || i === 4 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('  '));
    if (k === 0) console.log(widths.map((w) => '-'.repeat(w)).join('  '));
  }
  console.log('');
  say(
    `CPU of the receiving process: subscriber ${brokerClean.cpuUs.toFixed(1)} µs/message (clean), ${broker.cpuUs.toFixed(1)} (persistent); worker ${singles.cpuUs.toFixed(1)} µs/reading (single samples), ` +
      `${batched.cpuUs.toFixed(2)} µs/reading (batches)`,
  );
  say(
    `load average (1 min) at start ${loadAtStart.toFixed(1)}, at end ${os.loadavg()[0]!.toFixed(1)}, on ${os.cpus().length} CPUs`,
  );
  say(
    `rows in readings at the end: ${f(total[0]!.n)} (expected ${f(N + WARM_UP + N + messages * BATCH + paced)}); flush ${process.env['INGEST_FLUSH_MS'] ?? 20} ms; ` +
      `post-commit handlers: ${process.env['BENCH_HANDLERS'] === 'none' ? 'none' : "the product's"}`,
  );
  fs.rmSync(dir, { recursive: true, force: true });
}

main().catch(async (e) => {
  console.error(e);
  for (const c of children) await stopChild(c);
  await stopLocalPostgres(path.join(dir, 'pg')).catch(() => {});
  process.exit(1);
});
