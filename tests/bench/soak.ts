/**
 * `npm run bench:soak` — the demo plant at 20× speed for 30 minutes (SOAK_MINUTES, SOAK_SPEED)
 * through the whole product as `npm start` runs it (its own state folder and ports, no seeded
 * history so every reading in the database came from this run). Prints, per process, resident
 * memory, heap, active handles and event-loop delay at the start (after a warm-up) and at the
 * end, and the readings published against those stored (lost and duplicated must be 0).
 * Nothing here asserts; the figures are for reading.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { clusterDir, freePort, startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
import type { ProcessMetrics } from '../../src/lib/core/process-metrics.ts';
import { root } from '../support/test-stack.ts';

const minutes = Number(process.env['SOAK_MINUTES'] ?? 30);
const speed = Number(process.env['SOAK_SPEED'] ?? 20);
const warmupMs = 60_000;
const varDir = path.join(root, 'var', `soak-${process.pid}`);
const metricsDir = path.join(varDir, 'metrics');
const names = ['broker', 'ingest-worker', 'web', 'simulator'];

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const mib = (b: number) => `${(b / 1048576).toFixed(1)} MiB`;

function snapshot(): Record<string, ProcessMetrics | null> {
  const out: Record<string, ProcessMetrics | null> = {};
  for (const n of names) {
    try {
      out[n] = JSON.parse(fs.readFileSync(path.join(metricsDir, `${n}.json`), 'utf8')) as ProcessMetrics;
    } catch {
      out[n] = null;
    }
  }
  return out;
}

async function main() {
  const webPort = await freePort();
  const mqttPort = await freePort();
  // Plant time runs `speed` times faster and ends at "now" when the run ends: never in the future.
  const plantStartMs = Date.now() - minutes * 60_000 * speed + minutes * 60_000;
  let out = '';
  const stack = spawn(process.execPath, ['--import', 'tsx', 'ingest/stack.ts'], {
    cwd: root,
    env: {
      ...process.env,
      COATRAIL_VAR_DIR: varDir,
      COATRAIL_HISTORY_DAYS: '0',
      COATRAIL_METRICS_DIR: metricsDir,
      PORT: String(webPort),
      MQTT_PORT: String(mqttPort),
      MQTT_WS_PORT: String(await freePort()),
      SIMULATOR: '1',
      SIM_SPEED: String(speed),
      SIM_START_MS: String(plantStartMs),
      DATABASE_URL: '',
      PUBLIC_ORIGIN: '',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  stack.stdout.on('data', (b: Buffer) => (out += b.toString()));
  stack.stderr.on('data', (b: Buffer) => (out += b.toString()));
  const until = Date.now() + 600_000;
  while (!out.includes('Coatrail is running at')) {
    if (stack.exitCode !== null || Date.now() > until) throw new Error(`the product did not start:\n${out.slice(-3000)}`);
    await sleep(500);
  }
  console.log(`soak: ${minutes} min at ${speed}× (${((minutes * speed) / 60).toFixed(1)} h of plant time); warming up 60 s…`);
  await sleep(warmupMs);
  const first = snapshot();
  const t0 = Date.now();
  while (Date.now() - t0 < minutes * 60_000 - warmupMs) {
    await sleep(60_000);
    const s = snapshot();
    const w = s['ingest-worker'];
    console.log(
      `soak: ${Math.round((Date.now() - t0) / 60_000) + 1} min — worker ${w ? mib(w.rssBytes) : '?'}, simulator sent ${Number(s['simulator']?.extra['samplesSent'] ?? NaN)}`,
    );
  }
  const last = snapshot();
  stack.kill('SIGTERM');
  while (stack.exitCode === null) await sleep(200);
  const final = snapshot(); // the simulator and worker write theirs once more as they stop

  console.log('');
  console.log('| process | RSS start → end | heap start → end | handles start → end | event-loop delay p99 start → end (max) |');
  console.log('|---|---|---|---|---|');
  for (const n of names) {
    const a = first[n];
    const b = last[n];
    if (!a || !b) {
      console.log(`| ${n} | (no figures) | | | |`);
      continue;
    }
    console.log(
      `| ${n} | ${mib(a.rssBytes)} → ${mib(b.rssBytes)} | ${mib(a.heapUsedBytes)} → ${mib(b.heapUsedBytes)} | ${a.activeHandles} → ${b.activeHandles} | ${a.eventLoopDelayMs.p99.toFixed(1)} → ${b.eventLoopDelayMs.p99.toFixed(1)} ms (${b.eventLoopDelayMs.max.toFixed(0)} ms) |`,
    );
  }

  const sent = Number(final['simulator']?.extra['samplesSent'] ?? NaN);
  const dropped = Number(final['simulator']?.extra['samplesDropped'] ?? 0);
  const h = await startLocalPostgres({ baseDir: path.join(varDir, 'pg'), database: 'coatrail' });
  const db = new pg.Client({ connectionString: h.url });
  await db.connect();
  const stored = (await db.query<{ n: number }>('select count(*)::int as n from readings')).rows[0]!.n;
  const rejected = (
    await db.query<{ reason: string; n: number }>('select reason, count(*)::int as n from ingest_rejections group by 1')
  ).rows;
  const dup = rejected.find((r) => r.reason === 'duplicate')?.n ?? 0;
  const lastByKind = (
    await db.query<{ kind: string; n: number; first: string; last: string }>(
      `select c.kind, count(*)::int as n, min(r.ts)::text as first, max(r.ts)::text as last from readings r join channels c on c.id = r.channel_id group by 1 order by 1`,
    )
  ).rows;
  console.log(`plant time at the simulator's stop: ${JSON.stringify(final['simulator']?.extra['plantTime'])}`);
  console.log(`plant time at the start: ${new Date(plantStartMs).toISOString()}`);
  for (const r of lastByKind) console.log(`  ${r.kind}: ${r.n} stored, ${r.first} … ${r.last}`);
  await db.end();
  await stopLocalPostgres(path.join(varDir, 'pg'));
  console.log('');
  console.log(`readings published by the simulator: ${sent} (${dropped} dropped by gateways while offline)`);
  console.log(`readings stored: ${stored}; lost: ${sent - stored}; duplicates refused: ${dup}`);
  console.log(`refused messages by reason: ${rejected.map((r) => `${r.reason} ${r.n}`).join(', ') || 'none'}`);
  const cluster = clusterDir(path.join(varDir, 'pg'));
  fs.rmSync(varDir, { recursive: true, force: true });
  fs.rmSync(cluster, { recursive: true, force: true });
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
