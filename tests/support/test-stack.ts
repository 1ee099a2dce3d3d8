/**
 * The test run's real services: a throwaway PostgreSQL cluster on a free loopback port,
 * migrated and seeded; the local fake SMTP server; the MQTT broker, the ingest worker and
 * the built web server as child processes on free ports. Nothing is mocked.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createPool, createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { freePort, startLocalPostgres, stopLocalPostgres, type LocalPg } from '../../db/pg-control.ts';
import { buildIfNeeded } from '../../ingest/build.ts';
import { startFakeSmtp, type FakeSmtp } from '../../ingest/fake-smtp.ts';
import { seedAll } from '../../seeds/index.ts';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const TEST_PASSWORD = 'test-password-1';
export const TEST_DEVICE_SECRET = 'test-device-secret';
export const TEST_SERVICE_PASSWORD = 'test-service-password';
/** Days of seeded readings history in the test database (the story load is 9 days back). */
export const TEST_HISTORY_DAYS = 12;

export interface TestStackInfo {
  databaseUrl: string;
  baseUrl: string;
  mqttPort: number;
  smtpUrl: string;
  pgBaseDir: string;
}

export interface TestStack extends TestStackInfo {
  children: Map<string, ChildProcess>;
  env: NodeJS.ProcessEnv;
  stop(): Promise<void>;
}

async function waitFor(check: () => Promise<boolean>, timeoutMs: number, what: string) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check().catch(() => false)) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`timed out waiting for ${what}`);
}

export async function startTestStack(): Promise<TestStack> {
  // The web server runs from this run's own copy of the build: another run may rebuild dist/ meanwhile.
  const distCopy = path.join(root, 'var', `test-dist-${process.pid}`);
  buildIfNeeded(root, (s) => console.log(`[test] ${s}`), { snapshotTo: distCopy });
  const pgBaseDir = path.join(root, 'var', `test-pg-${process.pid}`);
  fs.rmSync(pgBaseDir, { recursive: true, force: true });
  const saved = process.env['DATABASE_URL'];
  delete process.env['DATABASE_URL'];
  let pgh: LocalPg;
  try {
    pgh = await startLocalPostgres({ baseDir: pgBaseDir, database: 'coatrail_test' });
  } finally {
    if (saved) process.env['DATABASE_URL'] = saved;
  }
  const sequelize = createSequelize({ url: pgh.url, max: 2 });
  await migrateUp(sequelize);
  const seedStart = performance.now();
  await seedAll(sequelize, {
    demoPassword: TEST_PASSWORD,
    deviceSecret: TEST_DEVICE_SECRET,
    history: { days: TEST_HISTORY_DAYS },
  });
  console.log(
    `[test] seeded the demo plant and ${TEST_HISTORY_DAYS} days of history in ${((performance.now() - seedStart) / 1000).toFixed(1)} s`,
  );
  await sequelize.close();
  const pool = createPool({ url: pgh.url, max: 2 });
  const smtp: FakeSmtp = await startFakeSmtp(pool, 0);
  const [webPort, mqttPort] = [await freePort(), await freePort()];
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: pgh.url,
    MQTT_PORT: String(mqttPort),
    MQTT_SERVICE_PASSWORD: TEST_SERVICE_PASSWORD,
    SMTP_URL: smtp.url,
    SIM_DEVICE_SECRET: TEST_DEVICE_SECRET,
    HOST: '127.0.0.1',
    PORT: String(webPort),
    PUBLIC_ORIGIN: `http://127.0.0.1:${webPort}`,
    INGEST_WORKER_ID: 'test-worker',
    ASTRO_TELEMETRY_DISABLED: '1',
  };
  const children = new Map<string, ChildProcess>();
  const start = (name: string, args: string[]) => {
    const logFile = fs.openSync(path.join(pgBaseDir, `${name}.log`), 'a');
    const proc = spawn(process.execPath, args, { cwd: root, env, stdio: ['ignore', logFile, logFile] });
    children.set(name, proc);
    return proc;
  };
  start('broker', ['--import', 'tsx', 'ingest/broker-main.ts']);
  start('worker', ['--import', 'tsx', 'ingest/main.ts']);
  start('web', [path.join(distCopy, 'server', 'entry.mjs')]);
  const baseUrl = `http://127.0.0.1:${webPort}`;
  try {
    // Generous: on a 2-core machine shared by parallel test runs, start-up can take a minute.
    await waitFor(async () => (await fetch(`${baseUrl}/api/health`)).status === 200, 90_000, 'the web server to report healthy');
  } catch (e) {
    // Leave nothing running behind a failed start (the logs stay in pgBaseDir).
    for (const proc of children.values()) if (proc.exitCode === null) proc.kill('SIGKILL');
    await smtp.close().catch(() => {});
    await pool.end().catch(() => {});
    await stopLocalPostgres(pgBaseDir).catch(() => {});
    throw e;
  }
  return {
    databaseUrl: pgh.url,
    baseUrl,
    mqttPort,
    smtpUrl: smtp.url,
    pgBaseDir,
    children,
    env,
    async stop() {
      for (const proc of children.values()) if (proc.exitCode === null) proc.kill('SIGTERM');
      for (const proc of children.values()) {
        const until = Date.now() + 5000;
        while (proc.exitCode === null && proc.signalCode === null && Date.now() < until)
          await new Promise((r) => setTimeout(r, 50));
        if (proc.exitCode === null && proc.signalCode === null) proc.kill('SIGKILL');
      }
      await smtp.close();
      await pool.end();
      await stopLocalPostgres(pgBaseDir);
      if (!process.env['KEEP_TEST_DB']) fs.rmSync(pgBaseDir, { recursive: true, force: true });
      fs.rmSync(distCopy, { recursive: true, force: true });
    },
  };
}
