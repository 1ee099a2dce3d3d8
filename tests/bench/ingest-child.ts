/**
 * Child process of `npm run bench:ingest` (tests/bench/ingest.ts): either the real ingest
 * worker (ingest/subscriber.ts, with a post-commit handler that times each stored reading:
 * now − its sample time, where the publisher set the sample time to the publish time) or a
 * plain MQTT subscriber (the broker-only limit; `subscriber persistent` with a persistent session
 * like the worker's, acknowledging at once). Talks to the parent over IPC:
 *   parent → {expect: n}          start counting n readings (or messages)
 *   child  → {ready} once connected; {done, count, lastMs, p50, p99, max, cpuMs} when n have
 *            arrived (cpuMs: this process's CPU time since {expect}).
 */
import fs from 'node:fs';
import { Session } from 'node:inspector/promises';
import mqtt from 'mqtt';
import { createPool, createSequelize } from '../../db/connection.ts';
import { initModels } from '../../db/models/index.ts';
import { loadConfig } from '../../ingest/config.ts';
import { postCommitHandlers, type PostCommitHandler } from '../../ingest/handlers/index.ts';
import { startWorker } from '../../ingest/subscriber.ts';

const mode = process.argv[2] === 'subscriber' ? 'subscriber' : 'worker';
/** `subscriber persistent`: a persistent session (clean: false, fixed client id), as the worker has. */
const persistent = process.argv[3] === 'persistent';
const send = (m: unknown) => process.send?.(m);

let expected = 0;
let count = 0;
let latencies = new Float64Array(0);
let timed = 0;
let cpuAtStart = process.cpuUsage();

function record(nowMs: number, tMs: number, timeIt: boolean) {
  if (!expected) return;
  if (timeIt && timed < latencies.length) latencies[timed++] = nowMs - tMs;
  count++;
  if (count === expected) {
    const lat = latencies.subarray(0, timed).sort();
    const q = (p: number) => (lat.length ? lat[Math.min(lat.length - 1, Math.floor(p * lat.length))]! : NaN);
    const cpu = process.cpuUsage(cpuAtStart);
    void profileStop();
    send({
      done: true,
      count,
      lastMs: nowMs,
      p50: q(0.5),
      p99: q(0.99),
      max: lat.length ? lat[lat.length - 1] : NaN,
      cpuMs: (cpu.user + cpu.system) / 1000,
    });
    expected = 0;
  }
}

let timeSamples = true;
// BENCH_PROFILE=dir: write a CPU profile of this process (.cpuprofile, for Chrome DevTools) per phase.
const profileDir = process.env['BENCH_PROFILE'];
const inspector = profileDir ? new Session() : null;
if (inspector) inspector.connect();
let phase = 0;
async function profileStart() {
  if (!inspector) return;
  await inspector.post('Profiler.enable');
  await inspector.post('Profiler.start');
}
async function profileStop() {
  if (!inspector) return;
  const { profile } = await inspector.post('Profiler.stop');
  fs.writeFileSync(`${profileDir}/${mode}-${++phase}.cpuprofile`, JSON.stringify(profile));
}

process.on('message', (m: { expect?: number; time?: boolean }) => {
  if (m.expect) {
    void profileStart();
    expected = m.expect;
    count = 0;
    timed = 0;
    timeSamples = m.time ?? true;
    latencies = new Float64Array(m.expect);
    cpuAtStart = process.cpuUsage();
  }
});

if (mode === 'subscriber') {
  const url = process.env['MQTT_URL']!;
  const client = mqtt.connect(url, {
    username: 'svc-ingest',
    password: process.env['MQTT_SERVICE_PASSWORD']!,
    protocolVersion: 4,
    clean: !persistent,
    clientId: persistent ? 'coatrail-ingest-bench-sub-persistent' : `coatrail-ingest-bench-sub-${process.pid}`,
  });
  client.on('message', (_topic, buf) => {
    const now = Date.now();
    const p = JSON.parse(buf.toString('utf8')) as { t: number };
    record(now, p.t, true);
  });
  client.on('connect', () => {
    client.subscribe('coatrail/v1/+/+/+/+', { qos: 1 }, () => send({ ready: true }));
  });
  // Leave no persistent subscription behind to collect the later phases' messages.
  process.once('SIGTERM', () => client.unsubscribe('coatrail/v1/+/+/+/+', () => client.end(false, {}, () => process.exit(0))));
} else {
  const config = loadConfig();
  // Transitional: the post-commit handlers that still take a pg pool.
  const pool = createPool({ url: config.DATABASE_URL, max: 4, connectionTimeoutMillis: 5000 });
  const timer: PostCommitHandler = {
    name: 'bench-timer',
    async onReadings(_ctx, rows) {
      const now = Date.now();
      for (const r of rows) record(now, r.tMs, timeSamples);
    },
  };
  // BENCH_HANDLERS=none measures the pipeline alone, without the product's post-commit handlers.
  // BENCH_HANDLERS=name,name runs only those.
  const wanted = process.env['BENCH_HANDLERS'];
  const others =
    wanted === 'none' ? [] : wanted ? postCommitHandlers.filter((h) => wanted.split(',').includes(h.name)) : postCommitHandlers;
  const sequelize = createSequelize({ url: config.DATABASE_URL, max: 6, connectionTimeoutMillis: 5000 });
  initModels(sequelize);
  const worker = await startWorker({ config, sequelize, pool, handlers: [timer, ...others] });
  const ready = setInterval(() => {
    if (worker.stats().subscribed) {
      clearInterval(ready);
      send({ ready: true });
    }
  }, 100);
  process.once('SIGTERM', () => {
    void (async () => {
      await worker.close();
      await pool.end();
      await sequelize.close();
      process.exit(0);
    })();
  });
}
