/**
 * What `npm start` may do, decided before anything starts (pure where it can be, so that it is
 * tested without spawning the product):
 *
 * - **demo** (default): the invented demo plant, its five users and the simulator, for a
 *   machine that only listens on loopback. Refused while it would keep the published demo
 *   password and listens on another address or sits behind PUBLIC_ORIGIN.
 * - **production** (`npm run start:production`): no demo data, no simulator; the site from
 *   SITE_NAME / SITE_TIME_ZONE and one administrator with a one-time password, printed once and
 *   changed at first sign-in.
 */
import { randomBytes } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import { Site, User, initModels } from '../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../db/transaction.ts';
import { DEMO_USERS } from '../seeds/demo-plant.ts';
import { hashPassword, verifyPassword } from '../src/lib/server/passwords.ts';

/** The demo users' password printed in the README (for a loopback-only demo). */
export const PUBLISHED_DEMO_PASSWORD = 'fernhollow-demo';
export const DEFAULT_SITE_NAME = 'Coating plant';
export const DEFAULT_SITE_TIME_ZONE = 'UTC';

const SYSTEM: AuditActor = { id: null, label: 'system:start-up', address: null };

export interface StartPlan {
  mode: 'demo' | 'production';
  /** Seed the demo plant and run the simulator. */
  demo: boolean;
  simulate: boolean;
  /** The demo users' password (demo mode). */
  demoPassword: string;
  /** Listening beyond loopback or behind PUBLIC_ORIGIN. */
  exposed: boolean;
  /** One plain line saying what to do, when the start must be refused. */
  refusal: string | null;
}

export function isLoopbackHost(host: string): boolean {
  const h = host
    .trim()
    .toLowerCase()
    .replace(/^\[|\]$/g, '');
  return h === 'localhost' || h === '::1' || /^127(\.\d{1,3}){3}$/.test(h);
}

/** Decide the start mode from the environment and the command line. */
export function planStart(env: NodeJS.ProcessEnv, argv: readonly string[] = []): StartPlan {
  const production = argv.includes('--production') || (env['COATRAIL_MODE'] ?? '').toLowerCase() === 'production';
  const host = env['HOST'] ?? '127.0.0.1';
  const exposed = !isLoopbackHost(host) || Boolean(env['PUBLIC_ORIGIN']);
  const demoPassword = env['DEMO_PASSWORD'] || PUBLISHED_DEMO_PASSWORD;
  const simulatorWanted = !['0', 'false', 'no'].includes((env['SIMULATOR'] ?? '1').toLowerCase());
  if (production) {
    return { mode: 'production', demo: false, simulate: false, demoPassword, exposed, refusal: null };
  }
  const refusal =
    exposed && demoPassword === PUBLISHED_DEMO_PASSWORD
      ? `Refusing to start the demo with its published password while ${
          isLoopbackHost(host) ? 'PUBLIC_ORIGIN is set' : `listening on HOST=${host}`
        }: set DEMO_PASSWORD to a password of your own, or run "npm run start:production".`
      : null;
  return { mode: 'demo', demo: true, simulate: simulatorWanted, demoPassword, exposed, refusal };
}

/**
 * Demo users that still have the published password: re-keyed to `newPassword` (a non-default
 * DEMO_PASSWORD), or, with `null` (a production start on a former demo database), deactivated.
 * Each change is audited. Returns the usernames changed.
 */
export async function secureDemoUsers(
  sequelize: Sequelize,
  newPassword: string | null,
  usernames: readonly string[] = DEMO_USERS.map((u) => u.username),
): Promise<string[]> {
  initModels(sequelize);
  const changed: string[] = [];
  const newHash = newPassword ? await hashPassword(newPassword) : null;
  for (const username of usernames) {
    const u = await User.findOne({ where: { username } });
    if (!u || !u.active || !(await verifyPassword(u.passwordHash, PUBLISHED_DEMO_PASSWORD))) continue;
    await withTransaction(sequelize, async (t) => {
      const row = await User.findByPk(u.id, { transaction: t, lock: t.LOCK.UPDATE });
      if (!row) return;
      if (newHash) {
        row.passwordHash = newHash;
        row.updatedAt = new Date();
        await row.save({ transaction: t });
        await auditIn(t, SYSTEM, {
          action: 'user.password-set',
          entity: 'user',
          entityId: row.id,
          after: { via: 'DEMO_PASSWORD at start-up (the published demo password was replaced)' },
        });
      } else {
        row.active = false;
        row.updatedAt = new Date();
        await row.save({ transaction: t });
        await auditIn(t, SYSTEM, {
          action: 'user.updated',
          entity: 'user',
          entityId: row.id,
          before: { active: true },
          after: { active: false, reason: 'production start: a demo user kept the published password' },
        });
      }
    });
    changed.push(username);
  }
  return changed;
}

/** A site code from its name: lower-case letters, digits and dashes (the topic contract's alphabet). */
export function siteCodeFrom(name: string): string {
  const code = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 32)
    .replace(/-+$/g, '');
  return code || 'site';
}

export function validTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

export interface ProductionSetUp {
  siteCreated: boolean;
  /** Set when the first administrator was created: print it once, never store it. */
  admin: { username: string; password: string } | null;
}

/**
 * First production start: create the site (when there is none) and, when no active
 * administrator exists, one administrator with a random one-time password that must be changed
 * at first sign-in. Idempotent; both are audited.
 */
export async function setUpProduction(
  sequelize: Sequelize,
  opts: { siteName?: string | undefined; siteTimeZone?: string | undefined; adminUsername?: string } = {},
): Promise<ProductionSetUp> {
  initModels(sequelize);
  const name = (opts.siteName ?? '').trim() || DEFAULT_SITE_NAME;
  const timeZone = (opts.siteTimeZone ?? '').trim() || DEFAULT_SITE_TIME_ZONE;
  if (!validTimeZone(timeZone)) throw new Error(`SITE_TIME_ZONE "${timeZone}" is not an IANA time zone such as Europe/Berlin.`);
  let siteCreated = false;
  if ((await Site.count()) === 0) {
    await withTransaction(sequelize, async (t) => {
      const site = await Site.create({ code: siteCodeFrom(name), name, timeZone }, { transaction: t });
      await auditIn(t, SYSTEM, {
        action: 'site.created',
        entity: 'site',
        entityId: site.id,
        after: { code: site.code, name, timeZone },
      });
    });
    siteCreated = true;
  }
  let admin: ProductionSetUp['admin'] = null;
  if ((await User.count({ where: { role: 'admin', active: true } })) === 0) {
    let username = opts.adminUsername ?? 'admin';
    if (await User.findOne({ where: { username } })) username = `${username}-${randomBytes(3).toString('hex')}`;
    const password = randomBytes(15).toString('base64url');
    const passwordHash = await hashPassword(password);
    await withTransaction(sequelize, async (t) => {
      const u = await User.create(
        { username, displayName: 'Administrator', email: null, role: 'admin', passwordHash, mustChangePassword: true },
        { transaction: t },
      );
      await auditIn(t, SYSTEM, {
        action: 'user.created',
        entity: 'user',
        entityId: u.id,
        after: { username, role: 'admin', mustChangePassword: true, via: 'production start-up' },
      });
    });
    admin = { username, password };
  }
  return { siteCreated, admin };
}
