/**
 * Chart read-path benchmark: `npm run bench:charts`.
 *
 * On a throwaway PostgreSQL (db/pg-control.ts, in var/bench-charts-<pid>, removed afterwards
 * unless KEEP_BENCH_DB=1) it:
 * 1. seeds the demo plant (for users and a site) and 50 bench channels, then generates 30 days
 *    of 1 Hz readings for all of them in SQL (generate_series, one day per INSERT, two at a time,
 *    rows in time order across channels as a live plant writes them), vacuums, and builds the
 *    minute and hour rollups with one SQL each. When the projected generation time passes
 *    10 minutes, the remaining days keep the queried channel at 1 Hz and thin the 49 others
 *    (one reading every k seconds) — the output says so;
 * 2. times the readings endpoint's query path for one channel over the 30 days with
 *    maxPoints = 1000 (the store function directly, then over HTTP against the built web server),
 *    p50 and p95 over 25 runs, beside the time of a full raw SELECT of the same range (ratio);
 * 3. times the first drawn chart in Chromium for that range (the trend page sets
 *    `data-drawn="true"` once the chart has rendered with its data).
 * Prints a table. Targets: endpoint p95 < 100 ms; first drawn chart < 1.5 s.
 * Benchmarks print figures; they assert nothing.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { chromium } from 'playwright-core';
import { createPool, createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { freePort, startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
import { seedDemoPlant } from '../../seeds/demo-plant.ts';
import { queryReadings } from '../../src/lib/core/readings-store.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const CHANNELS = Number(process.env['BENCH_CHANNELS'] ?? 50);
const DAYS = Number(process.env['BENCH_DAYS'] ?? 30);
const RUNS = Number(process.env['BENCH_RUNS'] ?? 25);
const BUDGET_MS = Number(process.env['BENCH_BUDGET_MIN'] ?? 10) * 60_000;
const PARALLEL = 2;
const MAX_POINTS = 1000;
const DAY = 86_400_000;
const PASSWORD = `bench-${randomBytes(6).toString('hex')}`;

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))] ?? Number.NaN;
};
const f1 = (ms: number) => (Number.isFinite(ms) ? `${ms.toFixed(1)} ms` : '—');
const secs = (ms: number) => `${(ms / 1000).toFixed(1)} s`;
const log = (s: string) => console.log(`[bench:charts] ${s}`);

async function timeRuns(n: number, run: () => Promise<unknown>): Promise<{ first: number; times: number[] }> {
  let t = performance.now();
  await run();
  const first = performance.now() - t;
  const times: number[] = [];
  for (let i = 0; i < n; i++) {
    t = performance.now();
    await run();
    times.push(performance.now() - t);
  }
  return { first, times };
}

async function main() {
  const base = path.join(root, 'var', `bench-charts-${process.pid}`);
  const load0 = os.loadavg()[0]!.toFixed(1);
  fs.rmSync(base, { recursive: true, force: true });
  const kids: ChildProcess[] = [];
  let pool: pg.Pool | null = null;
  const rows: [string, string, string][] = [];
  try {
    delete process.env['DATABASE_URL'];
    log(`PostgreSQL in ${path.relative(root, base)}…`);
    const pgh = await startLocalPostgres({ baseDir: base, database: 'coatrail_bench' });
    pool = createPool({ url: pgh.url, max: PARALLEL + 2 });
    // Bulk-load settings only (fewer checkpoints); the read path runs on the defaults.
    await pool.query(`alter system set max_wal_size = '16GB'`);
    await pool.query(`alter system set checkpoint_timeout = '30min'`);
    await pool.query(`alter system set synchronous_commit = off`);
    await pool.query('select pg_reload_conf()');
    const seq = createSequelize({ url: pgh.url, max: 2 });
    await migrateUp(seq);
    await seedDemoPlant(seq, { demoPassword: PASSWORD, deviceSecret: randomBytes(16).toString('hex') });
    await seq.close();

    // 50 bench channels on one line asset, owned by one bench gateway.
    const site = (await pool.query<{ id: number }>('select id from sites order by id limit 1')).rows[0]!.id;
    const dev = (
      await pool.query<{ id: number }>(
        `insert into devices (site_id, name, username, password_hash, topic_prefix) values ($1, 'Bench gateway', 'bench-gw', 'unused', 'coatrail/v1/fernhollow/bench-gw') returning id`,
        [site],
      )
    ).rows[0]!.id;
    const asset = (
      await pool.query<{ id: number }>(
        `insert into assets (site_id, kind, code, name) values ($1, 'line', 'bench-line', 'Bench line') returning id`,
        [site],
      )
    ).rows[0]!.id;
    const ids: number[] = [];
    for (let i = 1; i <= CHANNELS; i++) {
      const key = `ch-${String(i).padStart(2, '0')}`;
      const r = await pool.query<{ id: number }>(
        `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, 'other', '°C', -50, 250) returning id`,
        [asset, dev, key, `Bench channel ${i}`],
      );
      ids.push(r.rows[0]!.id);
    }
    const queried = ids[0]!;
    const end = Math.floor(Date.now() / 60_000) * 60_000;
    const start = end - DAYS * DAY;
    await pool.query('select ensure_reading_partitions($1, $2)', [new Date(start), new Date(end + DAY)]);

    // ---- generation: one INSERT per day, PARALLEL at a time, time-major order.
    log(`Generating ${DAYS} days × 1 Hz × ${CHANNELS} channels = ${((DAYS * 86_400 * CHANNELS) / 1e6).toFixed(1)} M rows…`);
    const genT0 = performance.now();
    let everyK = 1; // others at every k-th second (1 = full density)
    let firstDayMs = 0;
    let totalRows = 0;
    const thinned: number[] = [];
    const insertDay = async (d: number, k: number) => {
      const t = performance.now();
      const r = await pool!.query(
        `insert into readings (channel_id, ts, value)
         select c.id, t, round((20 + c.id % 7 + 4 * sin(extract(epoch from t) / 900.0 + c.id) + 0.3 * sin(extract(epoch from t) / 7.0))::numeric, 3)::float8
           from generate_series($1::timestamptz, $2::timestamptz - interval '1 second', interval '1 second') t, lateral unnest($3::int[]) c(id)
          where c.id = $4 or (extract(epoch from t)::bigint % $5 = 0)`,
        [new Date(start + d * DAY), new Date(start + (d + 1) * DAY), ids, queried, k],
      );
      totalRows += r.rowCount ?? 0;
      if (k > 1) thinned.push(d);
      return performance.now() - t;
    };
    const queue = Array.from({ length: DAYS }, (_, d) => d);
    let done = 0;
    await Promise.all(
      Array.from({ length: PARALLEL }, async () => {
        for (let d = queue.shift(); d !== undefined; d = queue.shift()) {
          const ms = await insertDay(d, everyK);
          done++;
          if (done === 1) {
            firstDayMs = ms;
            // Projected total with PARALLEL days at a time; thin the other channels when it overruns.
            const projected = (ms * DAYS) / PARALLEL;
            if (projected > BUDGET_MS) {
              const remainingDays = queue.length + PARALLEL - 1;
              const budgetLeft = Math.max(60_000, BUDGET_MS - (performance.now() - genT0));
              const rowsPerMs = (86_400 * CHANNELS) / ms; // one worker
              const allowedPerDay = (budgetLeft * PARALLEL * rowsPerMs) / remainingDays;
              const othersPerDay = Math.max(1, allowedPerDay - 86_400);
              everyK = Math.max(2, Math.ceil(((CHANNELS - 1) * 86_400) / othersPerDay));
              log(
                `first day took ${secs(ms)}: ${DAYS} days would take about ${secs(projected)}; the other ${CHANNELS - 1} channels get one reading every ${everyK} s from now on`,
              );
            }
          }
          if (done % 5 === 0)
            log(`  ${done}/${DAYS} days, ${(totalRows / 1e6).toFixed(1)} M rows, ${secs(performance.now() - genT0)}`);
        }
      }),
    );
    const genMs = performance.now() - genT0;
    let t = performance.now();
    await pool.query('vacuum (analyze) readings');
    const vacuumMs = performance.now() - t;
    t = performance.now();
    await pool.query(`insert into readings_1m (channel_id, bucket, vmin, vmax, vsum, n)
      select channel_id, date_bin('1 minute', ts, 'epoch'::timestamptz), min(value), max(value), sum(value), count(*) from readings group by 1, 2`);
    const rollup1mMs = performance.now() - t;
    t = performance.now();
    await pool.query(`insert into readings_1h (channel_id, bucket, vmin, vmax, vsum, n)
      select channel_id, date_bin('1 hour', bucket, 'epoch'::timestamptz), min(vmin), max(vmax), sum(vsum), sum(n) from readings_1m group by 1, 2`);
    const rollup1hMs = performance.now() - t;
    await pool.query('vacuum (analyze) readings_1m, readings_1h');
    const size = (
      await pool.query<{ s: string }>(
        `select pg_size_pretty(sum(pg_total_relation_size(c.oid))) as s from pg_class c join pg_inherits i on i.inhrelid = c.oid join pg_class p on p.oid = i.inhparent where p.relname = 'readings'`,
      )
    ).rows[0]!.s;
    const density =
      thinned.length === 0
        ? `all ${CHANNELS} channels at 1 Hz`
        : `queried channel at 1 Hz for all ${DAYS} days; the other ${CHANNELS - 1} at 1 Hz for ${DAYS - thinned.length} days and one reading every ${everyK} s for ${thinned.length} days (${BUDGET_MS / 60_000}-minute generation budget)`;
    rows.push(['Generated readings', `${(totalRows / 1e6).toFixed(1)} M rows (${size} with index)`, density]);
    rows.push(['  generate_series INSERTs', secs(genMs), `first day ${secs(firstDayMs)}; ${PARALLEL} days at a time`]);
    rows.push(['  VACUUM ANALYZE readings', secs(vacuumMs), 'visibility map for index-only scans']);
    rows.push([
      '  rollups (1 SQL each)',
      `${secs(rollup1mMs)} + ${secs(rollup1hMs)}`,
      'readings_1m from raw, readings_1h from readings_1m',
    ]);
    log(`generation done: ${(totalRows / 1e6).toFixed(1)} M rows in ${secs(genMs + vacuumMs + rollup1mMs + rollup1hMs)}`);

    // ---- the store function (the endpoint's query path) for one channel over the whole range.
    const brief = { id: queried, unit: '°C' };
    const readSeq = createSequelize({ url: pgh.url, max: 2 });
    let shape = '';
    const store = await timeRuns(RUNS, async () => {
      const r = await queryReadings(readSeq, brief, { from: start, to: end, maxPoints: MAX_POINTS });
      shape =
        r.mode === 'raw'
          ? `raw, ${r.points.length} points`
          : `${r.buckets.length} buckets of ${r.bucketMs / 60_000} min from the ${r.source} source`;
    });
    rows.push([
      `Store queryReadings, ${DAYS} d, maxPoints ${MAX_POINTS}`,
      `p50 ${f1(pct(store.times, 50))} · p95 ${f1(pct(store.times, 95))}`,
      `${RUNS} runs after one warm-up (${f1(store.first)}); ${shape}`,
    ]);
    let shape2 = '';
    const store2 = await timeRuns(RUNS, async () => {
      const r = await queryReadings(readSeq, brief, { from: start, to: end, maxPoints: 2000 });
      shape2 = r.mode === 'raw' ? 'raw' : `${r.buckets.length} buckets of ${r.bucketMs / 60_000} min from the ${r.source} source`;
    });
    await readSeq.close();
    rows.push([
      `Store queryReadings, ${DAYS} d, maxPoints 2000`,
      `p50 ${f1(pct(store2.times, 50))} · p95 ${f1(pct(store2.times, 95))}`,
      shape2,
    ]);

    // ---- a full raw SELECT of the same range (epoch ms as the store returns them).
    const raw: number[] = [];
    let rawRows = 0;
    for (let i = 0; i < 3; i++) {
      t = performance.now();
      const r = await pool.query(
        `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
          where channel_id = $1 and ts >= to_timestamp($2::float8 / 1000) and ts < to_timestamp($3::float8 / 1000) order by ts`,
        [queried, start, end],
      );
      raw.push(performance.now() - t);
      rawRows = r.rowCount ?? 0;
    }
    const rawMed = pct(raw, 50);
    rows.push([
      'Full raw SELECT of the same range',
      secs(rawMed),
      `${(rawRows / 1e6).toFixed(2)} M rows, median of 3; ratio raw ÷ endpoint p50 = ${(rawMed / pct(store.times, 50)).toFixed(0)}×`,
    ]);

    // ---- the same over HTTP, against the built web server.
    const outDir = path.join(base, 'dist');
    log('Building the web app into the bench folder (astro build)…');
    const b = spawnSync(process.execPath, [path.join(root, 'node_modules', 'astro', 'astro.js'), 'build', '--outDir', outDir], {
      cwd: root,
      stdio: ['ignore', 'ignore', 'inherit'],
      env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
    });
    if (b.status !== 0) throw new Error('the web app did not build');
    const port = await freePort();
    const baseUrl = `http://127.0.0.1:${port}`;
    const web = spawn(process.execPath, [path.join(outDir, 'server', 'entry.mjs')], {
      cwd: root,
      env: {
        ...process.env,
        DATABASE_URL: pgh.url,
        HOST: '127.0.0.1',
        PORT: String(port),
        PUBLIC_ORIGIN: baseUrl,
        MQTT_PORT: String(await freePort()),
        ASTRO_TELEMETRY_DISABLED: '1',
      },
      stdio: ['ignore', fs.openSync(path.join(base, 'web.log'), 'a'), fs.openSync(path.join(base, 'web.log'), 'a')],
    });
    kids.push(web);
    for (let i = 0; i < 150; i++) {
      if ((await fetch(`${baseUrl}/login`).catch(() => null))?.status === 200) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    const login = await fetch(`${baseUrl}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ username: 'viewer', password: PASSWORD }),
    });
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`);
    const cookie = (login.headers.get('set-cookie') ?? '').split(';')[0]!;
    let bytes = 0;
    const http = await timeRuns(RUNS, async () => {
      const r = await fetch(`${baseUrl}/api/v1/channels/${queried}/readings?from=${start}&to=${end}&maxPoints=${MAX_POINTS}`, {
        headers: { cookie },
      });
      bytes = (await r.arrayBuffer()).byteLength;
      if (r.status !== 200) throw new Error(`readings: ${r.status}`);
    });
    rows.push([
      `HTTP GET …/readings, ${DAYS} d, maxPoints ${MAX_POINTS}`,
      `p50 ${f1(pct(http.times, 50))} · p95 ${f1(pct(http.times, 95))}`,
      `${RUNS} runs after one warm-up (${f1(http.first)}); ${(bytes / 1024).toFixed(0)} KiB JSON`,
    ]);

    // ---- first drawn chart in Chromium.
    const browser = await chromium.launch({
      executablePath: '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    });
    const draws: number[] = [];
    let points = '';
    try {
      for (let i = 0; i < 6; i++) {
        // A fresh context each time: no cached scripts or data.
        const ctx = await browser.newContext({ viewport: { width: 1440, height: 900 }, timezoneId: 'Europe/London' });
        const [name, ...rest] = cookie.split('=');
        await ctx.addCookies([{ name: name!, value: rest.join('='), url: baseUrl }]);
        const page = await ctx.newPage();
        const t0 = performance.now();
        await page.goto(`${baseUrl}/charts/channel/${queried}?from=${start}&to=${end}`);
        await page.locator('[data-trend][data-drawn="true"]').waitFor({ timeout: 30_000 });
        draws.push(performance.now() - t0);
        points = (await page.locator('[data-trend]').getAttribute('data-points')) ?? '';
        if (i === 0) await page.screenshot({ path: path.join(root, 'test-results', 'bench-charts-30d.png') }).catch(() => {});
        await ctx.close();
      }
    } finally {
      await browser.close();
    }
    const warm = draws.slice(1);
    rows.push([
      `Chromium: trend page to drawn chart, ${DAYS} d`,
      `first ${f1(draws[0]!)} · then p50 ${f1(pct(warm, 50))}, max ${f1(Math.max(...warm))}`,
      `navigation → data-drawn, fresh browser context each time; ${points} points plotted`,
    ]);

    // ---- the table.
    const w0 = Math.max(...rows.map((r) => r[0].length));
    const w1 = Math.max(...rows.map((r) => r[1].length));
    console.log(
      `\nChart read path — ${DAYS} days of 1 Hz readings, one channel, on this machine (${os.cpus().length} cores; load average at start ${load0}, at end ${os.loadavg()[0]!.toFixed(1)})\n`,
    );
    console.log(`${'measure'.padEnd(w0)}  ${'figure'.padEnd(w1)}  notes`);
    console.log(`${'-'.repeat(w0)}  ${'-'.repeat(w1)}  -----`);
    for (const r of rows) console.log(`${r[0].padEnd(w0)}  ${r[1].padEnd(w1)}  ${r[2]}`);
    console.log(
      `\nTargets: endpoint p95 < 100 ms (store ${f1(pct(store.times, 95))}, HTTP ${f1(pct(http.times, 95))}); first drawn chart < 1.5 s (first ${f1(draws[0]!)}).`,
    );
  } finally {
    for (const k of kids) if (k.exitCode === null) k.kill('SIGTERM');
    await pool?.end().catch(() => {});
    await stopLocalPostgres(base).catch(() => {});
    if (!process.env['KEEP_BENCH_DB']) fs.rmSync(base, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
