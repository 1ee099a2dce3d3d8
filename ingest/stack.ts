/**
 * `npm start`: the whole product on one machine. Builds the web app when needed, starts
 * PostgreSQL (db/pg-control.ts), migrates, seeds the demo plant into an empty database,
 * starts the local fake SMTP server, the MQTT broker, the ingest worker, the web server and
 * the demo-plant simulator, prints where to go, and on Ctrl-C / SIGTERM stops every process
 * it started and the database, leaving nothing behind.
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createPool, createSequelize } from '../db/connection.ts';
import { migrateUp } from '../db/migrate.ts';
import {
  PgControlError,
  isLocalPostgresRunning,
  portInUse,
  startLocalPostgres,
  stopLocalPostgresSync,
  type LocalPg,
} from '../db/pg-control.ts';
import { seedAll } from '../seeds/index.ts';
import { DEMO_USERS } from '../seeds/demo-plant.ts';
import { buildIfNeeded } from './build.ts';
import { startFakeSmtp, type FakeSmtp } from './fake-smtp.ts';
import { PUBLISHED_DEMO_PASSWORD, planStart, secureDemoUsers, setUpProduction } from './start-mode.ts';
import { Supervisor } from './supervisor.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
// COATRAIL_VAR_DIR: another state folder (the supervision test runs a whole second product).
const varDir = path.resolve(process.env['COATRAIL_VAR_DIR'] ?? path.join(root, 'var'));
const env = process.env;
const PORT = Number(env['PORT'] ?? 4321);
const HOST = env['HOST'] ?? '127.0.0.1';
const MQTT_PORT = Number(env['MQTT_PORT'] ?? 1883);
// Demo (default, loopback) or production (`npm run start:production`): see ingest/start-mode.ts.
const plan = planStart(env, process.argv.slice(2));
const demoPassword = plan.demoPassword;
const simulate = plan.simulate;

const say = (s: string) => console.log(`[coatrail] ${s}`);
const statusFile = path.join(varDir, 'run', 'supervisor.json');
let supervisor: Supervisor | null = null;
let pgHandle: LocalPg | null = null;
let smtp: FakeSmtp | null = null;
let stopping = false;

class StartError extends Error {}

/** Local secrets kept in the git-ignored var/ folder (generated once). */
function localSecrets(): { deviceSecret: string } {
  const file = path.join(varDir, 'local-secrets.json');
  if (fs.existsSync(file)) return JSON.parse(fs.readFileSync(file, 'utf8'));
  const s = { deviceSecret: randomBytes(24).toString('base64url') };
  fs.mkdirSync(varDir, { recursive: true });
  fs.writeFileSync(file, JSON.stringify(s), { mode: 0o600 });
  return s;
}

/** When this demo plant was first started: the simulator lays its oven schedules from it (var/simulator.json). */
function plantEpochMs(): number {
  const file = path.join(varDir, 'simulator.json');
  try {
    const v = (JSON.parse(fs.readFileSync(file, 'utf8')) as { epochMs?: number }).epochMs;
    if (typeof v === 'number' && Number.isFinite(v)) return v;
  } catch {
    /* first start */
  }
  const epochMs = Date.now();
  fs.mkdirSync(varDir, { recursive: true });
  fs.writeFileSync(file, JSON.stringify({ epochMs }));
  return epochMs;
}

function startChild(name: string, args: string[], childEnv: NodeJS.ProcessEnv): void {
  supervisor ??= new Supervisor({ cwd: root, statusFile, log: say });
  supervisor.start({ name, args, env: childEnv });
}

async function waitForHttp(url: string, timeoutMs: number): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      const r = await fetch(url);
      if (r.status < 500 || r.status === 503) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new StartError(`The web server did not answer at ${url} within ${timeoutMs / 1000} s.`);
}

async function shutdown(code: number): Promise<never> {
  if (stopping) return new Promise<never>(() => {});
  stopping = true;
  say('Stopping…');
  await supervisor?.stopAll();
  await smtp?.close().catch(() => {});
  if (pgHandle?.owned) stopLocalPostgresSync(path.join(varDir, 'pg'));
  say('Stopped.');
  process.exit(code);
}

async function main(): Promise<void> {
  process.once('SIGINT', () => void shutdown(0));
  process.once('SIGTERM', () => void shutdown(0));
  if (plan.refusal) throw new StartError(plan.refusal);
  for (const [what, port, variable] of [
    ['web server', PORT, 'PORT'],
    ['MQTT broker', MQTT_PORT, 'MQTT_PORT'],
  ] as const) {
    if (!env['MQTT_URL'] || what !== 'MQTT broker') {
      if (await portInUse(port))
        throw new StartError(`Port ${port} for the ${what} is already taken; set ${variable} to a free port.`);
    }
  }
  try {
    buildIfNeeded(root, say);
  } catch (e) {
    throw new StartError((e as Error).message);
  }

  pgHandle = await startLocalPostgres({
    baseDir: path.join(varDir, 'pg'),
    database: 'coatrail',
    port: env['PG_PORT'] ? Number(env['PG_PORT']) : undefined,
    log: say,
  });
  say(
    env['DATABASE_URL']
      ? 'Using the PostgreSQL server in DATABASE_URL.'
      : `PostgreSQL on 127.0.0.1:${pgHandle.port} (data in var/pg).`,
  );
  supervisor = new Supervisor({ cwd: root, statusFile, log: say });
  if (pgHandle.owned) {
    const pgPort = pgHandle.port;
    supervisor.watch({
      name: 'PostgreSQL',
      isUp: () => isLocalPostgresRunning(path.join(varDir, 'pg')),
      // Same port: every child's DATABASE_URL names it, and each reconnects by itself.
      restart: async () => {
        await startLocalPostgres({ baseDir: path.join(varDir, 'pg'), database: 'coatrail', port: pgPort, log: say });
      },
    });
  }
  const sequelize = createSequelize({ url: pgHandle.url, max: 2 });
  try {
    const applied = await migrateUp(sequelize);
    if (applied.length) say(`Applied ${applied.length} migration(s).`);
  } catch (e) {
    throw new StartError(`A database migration failed: ${(e as Error).message}`);
  }
  const { deviceSecret } = localSecrets();
  // COATRAIL_HISTORY_DAYS: days of seeded history on a new database (0: none; default 21).
  const historyDays = env['COATRAIL_HISTORY_DAYS'] ? Number(env['COATRAIL_HISTORY_DAYS']) : undefined;
  let firstAdmin: { username: string; password: string } | null = null;
  if (plan.demo) {
    await seedAll(sequelize, {
      demoPassword,
      deviceSecret,
      log: say,
      ...(historyDays === 0 ? { history: false } : historyDays ? { history: { days: historyDays } } : {}),
    });
    if (demoPassword !== PUBLISHED_DEMO_PASSWORD) {
      const rekeyed = await secureDemoUsers(sequelize, demoPassword);
      if (rekeyed.length) say(`Demo users ${rekeyed.join(', ')} had the published password; they now use DEMO_PASSWORD.`);
    }
  } else {
    const off = await secureDemoUsers(sequelize, null);
    if (off.length) say(`Deactivated demo users that kept the published password: ${off.join(', ')}.`);
    try {
      const set = await setUpProduction(sequelize, { siteName: env['SITE_NAME'], siteTimeZone: env['SITE_TIME_ZONE'] });
      if (set.siteCreated) say(`Created the site “${env['SITE_NAME'] || 'Coating plant'}”.`);
      firstAdmin = set.admin;
    } catch (e) {
      throw new StartError((e as Error).message);
    }
  }
  await sequelize.close();

  const pool = createPool({ url: pgHandle.url, max: 2 });
  let smtpUrl = env['SMTP_URL'];
  if (!smtpUrl) {
    smtp = await startFakeSmtp(pool, 0, say);
    smtpUrl = smtp.url;
  }

  const servicePassword = env['MQTT_SERVICE_PASSWORD'] ?? randomBytes(18).toString('base64url');
  const childEnv: NodeJS.ProcessEnv = {
    ...env,
    DATABASE_URL: pgHandle.url,
    MQTT_PORT: String(MQTT_PORT),
    MQTT_SERVICE_PASSWORD: servicePassword,
    SMTP_URL: smtpUrl,
    SIM_DEVICE_SECRET: deviceSecret,
    HOST,
    PORT: String(PORT),
    ASTRO_TELEMETRY_DISABLED: '1',
    PUBLIC_ORIGIN: env['PUBLIC_ORIGIN'] ?? `http://${HOST}:${PORT}`,
    COATRAIL_SUPERVISOR_STATUS: statusFile,
    // A stable client id: a restarted worker resumes its persistent session (and the readings
    // queued in it) instead of opening a new one named after its new pid.
    INGEST_WORKER_ID: env['INGEST_WORKER_ID'] ?? 'main',
    // Durable broker state (LevelDB) only when asked for: in the soak it lost about 2.5 % of
    // readings under many publishers, which the in-memory sessions do not (README).
    ...(env['BROKER_STATE_DIR'] ? { BROKER_STATE_DIR: env['BROKER_STATE_DIR'] } : {}),
  };
  const tsx = ['--import', 'tsx'];
  if (!env['MQTT_URL']) startChild('broker', [...tsx, 'ingest/broker-main.ts'], childEnv);
  startChild('ingest worker', [...tsx, 'ingest/main.ts'], childEnv);
  startChild('web server', ['dist/server/entry.mjs'], childEnv);
  const origin = `http://${HOST}:${PORT}`;
  await waitForHttp(`${origin}/api/health`, 30_000);
  if (simulate) startChild('simulator', [...tsx, 'seeds/simulator.ts'], { ...childEnv, SIM_EPOCH_MS: String(plantEpochMs()) });
  console.log('');
  say(`Coatrail is running at ${origin}`);
  if (plan.demo) {
    say(
      `Demo users: ${DEMO_USERS.map((u) => u.username).join(', ')} — password: ${env['DEMO_PASSWORD'] ? '(from DEMO_PASSWORD)' : PUBLISHED_DEMO_PASSWORD}`,
    );
  } else if (firstAdmin) {
    // Printed once, stored nowhere: the administrator must replace it at first sign-in.
    say(`Production start. First administrator: ${firstAdmin.username} — one-time password: ${firstAdmin.password}`);
    say('Sign in with it now; Coatrail asks for a new password before anything else. It is not shown again.');
  } else say('Production start (no demo data, no simulator).');
  say(
    `MQTT broker on ${env['MQTT_URL'] ?? `mqtt://127.0.0.1:${MQTT_PORT}`}; caught e-mail: ${origin}/admin/mail${simulate ? '; the demo-plant simulator is publishing' : ''}.`,
  );
  say('Every process is supervised: one that stops is restarted (see /api/health). Press Ctrl-C to stop everything.');
}

main().catch(async (e) => {
  if (e instanceof StartError || e instanceof PgControlError) console.error(`[coatrail] Cannot start: ${e.message}`);
  else console.error('[coatrail] Cannot start:', e);
  await shutdown(1);
});
