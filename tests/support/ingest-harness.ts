/**
 * Helpers for the telemetry pipeline tests: a device with its own asset and channels created
 * in a database, MQTT clients with device credentials, and a broker and workers of the test's
 * own as child processes on free loopback ports (so a test can kill and restart them without
 * touching the global stack's broker and worker).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import type pg from 'pg';
import { freePort } from '../../db/pg-control.ts';
import { hashPassword } from '../../src/lib/server/passwords.ts';
import { root } from './test-stack.ts';

export async function waitFor<T>(
  check: () => Promise<T | null | undefined | false>,
  timeoutMs: number,
  what: string,
  everyMs = 100,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  let last: unknown = null;
  while (Date.now() < until) {
    try {
      const v = await check();
      if (v) return v;
    } catch (e) {
      last = e;
    }
    await new Promise((r) => setTimeout(r, everyMs));
  }
  throw new Error(
    `timed out after ${timeoutMs} ms waiting for ${what}${last ? ` (last error: ${(last as Error).message})` : ''}`,
  );
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** `p`, or a rejection naming `what` once `timeoutMs` has passed (a wait that fails, never one that passes). */
export async function within<T>(p: Promise<T>, timeoutMs: number, what: string): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const late = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`timed out after ${timeoutMs} ms waiting for ${what}`)), timeoutMs);
  });
  try {
    return await Promise.race([p, late]);
  } finally {
    clearTimeout(timer);
  }
}

export interface TestChannelSpec {
  key: string;
  kind?: string;
  unit: string;
  min: number;
  max: number;
}

export interface TestDevice {
  id: number;
  username: string;
  password: string;
  prefix: string;
  assetCode: string;
  channels: Record<string, { id: number; topic: string }>;
  topic(key: string): string;
}

/** A device of its own (unique names), on a new asset of the demo site, with the given channels. */
export async function createTestDevice(pool: pg.Pool, channels: TestChannelSpec[], tag = 't'): Promise<TestDevice> {
  const suffix = `${tag}-${Date.now().toString(36)}-${randomBytes(3).toString('hex')}`.toLowerCase();
  const username = `gw-${suffix}`.slice(0, 60);
  const password = randomBytes(12).toString('base64url');
  const { rows: sites } = await pool.query<{ id: number; code: string }>(`select id, code from sites order by id limit 1`);
  const site = sites[0]!;
  const prefix = `coatrail/v1/${site.code}/${username}`;
  const { rows: dev } = await pool.query<{ id: number }>(
    `insert into devices(site_id, name, username, password_hash, topic_prefix) values ($1, $2, $3, $4, $5) returning id`,
    [site.id, `Test gateway ${suffix}`, username, await hashPassword(password), prefix],
  );
  const assetCode = `a-${suffix}`.slice(0, 32);
  const { rows: asset } = await pool.query<{ id: number }>(
    `insert into assets(site_id, kind, code, name) values ($1, 'tank', $2, $3) returning id`,
    [site.id, assetCode, `Test tank ${suffix}`],
  );
  const out: TestDevice['channels'] = {};
  for (const c of channels) {
    const { rows } = await pool.query<{ id: number }>(
      `insert into channels(asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, $5, $6, $7, $8) returning id`,
      [asset[0]!.id, dev[0]!.id, c.key, `Test ${c.key}`, c.kind ?? 'other', c.unit, c.min, c.max],
    );
    out[c.key] = { id: rows[0]!.id, topic: `${prefix}/${assetCode}/${c.key}` };
  }
  return {
    id: dev[0]!.id,
    username,
    password,
    prefix,
    assetCode,
    channels: out,
    topic: (key) => `${prefix}/${assetCode}/${key}`,
  };
}

export async function connectDevice(
  port: number,
  username: string,
  password: string,
  opts: mqtt.IClientOptions = {},
): Promise<MqttClient> {
  return mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, {
    username,
    password,
    // The broker binds client ids to the credential: `{username}` or `{username}-{suffix}`.
    clientId: `${username}-${randomBytes(4).toString('hex')}`,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    ...opts,
  });
}

export function portOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(port, '127.0.0.1');
    s.once('connect', () => {
      s.destroy();
      resolve(true);
    });
    s.once('error', () => resolve(false));
  });
}

export interface Child {
  proc: ChildProcess;
  logFile: string;
  log(): string;
  stop(signal?: NodeJS.Signals): Promise<void>;
}

/** Start `node --import tsx <script>` with `env`; output goes to a log file in `dir`. */
export function startChild(name: string, script: string, env: NodeJS.ProcessEnv, dir: string): Child {
  fs.mkdirSync(dir, { recursive: true });
  const logFile = path.join(dir, `${name}.log`);
  const fd = fs.openSync(logFile, 'a');
  const proc = spawn(process.execPath, ['--import', 'tsx', script], { cwd: root, env, stdio: ['ignore', fd, fd] });
  fs.closeSync(fd);
  return {
    proc,
    logFile,
    log: () => (fs.existsSync(logFile) ? fs.readFileSync(logFile, 'utf8') : ''),
    async stop(signal: NodeJS.Signals = 'SIGTERM') {
      if (proc.exitCode !== null || proc.signalCode !== null) return;
      proc.kill(signal);
      const until = Date.now() + 10_000;
      while (proc.exitCode === null && proc.signalCode === null && Date.now() < until) await sleep(25);
      if (proc.exitCode === null && proc.signalCode === null) proc.kill('SIGKILL');
      while (proc.exitCode === null && proc.signalCode === null) await sleep(25);
    },
  };
}

export const SERVICE_PASSWORD = 'ingest-test-service-pw';

export interface OwnBroker extends Child {
  port: number;
}

/** The product's broker (ingest/broker-main.ts) on a free (or given) loopback port. */
export async function startOwnBroker(databaseUrl: string, dir: string, port?: number): Promise<OwnBroker> {
  const p = port ?? (await freePort());
  const child = startChild(
    'broker',
    'ingest/broker-main.ts',
    { ...process.env, DATABASE_URL: databaseUrl, MQTT_PORT: String(p), MQTT_SERVICE_PASSWORD: SERVICE_PASSWORD },
    dir,
  );
  await waitFor(async () => portOpen(p), 20_000, `the broker on port ${p}`);
  return { ...child, port: p };
}

export interface WorkerEnv {
  databaseUrl: string;
  mqttUrl: string;
  workerId: string;
  journalDir: string;
  extra?: NodeJS.ProcessEnv;
}

/** An ingest worker (ingest/main.ts); resolves once it has connected to the broker. */
export async function startOwnWorker(w: WorkerEnv, dir: string): Promise<Child> {
  const child = startChild(
    `worker-${w.workerId}`,
    'ingest/main.ts',
    {
      ...process.env,
      DATABASE_URL: w.databaseUrl,
      MQTT_URL: w.mqttUrl,
      MQTT_SERVICE_PASSWORD: SERVICE_PASSWORD,
      INGEST_WORKER_ID: w.workerId,
      INGEST_JOURNAL_DIR: w.journalDir,
      ...w.extra,
    },
    dir,
  );
  const before = child.log().split('connected to').length;
  await waitFor(
    async () =>
      child.log().split('connected to').length > before ||
      (child.proc.exitCode !== null && Promise.reject(new Error(child.log()))),
    20_000,
    `worker ${w.workerId} to connect`,
  );
  return child;
}

/** Publish `n` single-sample messages (QoS 1), `t = t0 + i·stepMs`, `v = f(i)`, at most `perSecond`. */
export async function publishSeries(
  client: MqttClient,
  topic: string,
  n: number,
  opts: { t0: number; stepMs?: number; value?: (i: number) => number; perSecond?: number; onProgress?: (i: number) => void },
): Promise<void> {
  const step = opts.stepMs ?? 1000;
  const value = opts.value ?? ((i) => i % 50);
  const started = Date.now();
  const inflight: Promise<unknown>[] = [];
  for (let i = 0; i < n; i++) {
    inflight.push(client.publishAsync(topic, JSON.stringify({ t: opts.t0 + i * step, v: value(i) }), { qos: 1 }));
    if (inflight.length >= 100) await Promise.all(inflight.splice(0));
    opts.onProgress?.(i);
    if (opts.perSecond) {
      const due = started + ((i + 1) * 1000) / opts.perSecond;
      const wait = due - Date.now();
      if (wait > 0) await sleep(wait);
    }
  }
  await Promise.all(inflight);
}

export async function countReadings(pool: pg.Pool, channelId: number): Promise<number> {
  const { rows } = await pool.query<{ n: number }>('select count(*)::int as n from readings where channel_id = $1', [channelId]);
  return rows[0]!.n;
}
