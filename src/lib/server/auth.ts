/**
 * Sessions with lucia v3 over our Sequelize models (a small adapter), argon2id passwords,
 * API tokens for machine clients, brute-force throttling kept in PostgreSQL, and the
 * electronic-signature check (US 21 CFR Part 11 §11.200: re-enter the password).
 */
import { createHash, randomBytes } from 'node:crypto';
import { Lucia, TimeSpan, generateIdFromEntropySize, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { Op } from 'sequelize';
import { ApiToken, LoginThrottle, User, UserSession, type SignatureRecord } from '../../../db/models/index.ts';
import { recordAuditEvent, recordFailureRecord, sessionKey } from '../core/accounts-store.ts';
import type { Role } from '../shared/roles.ts';
import { config } from './config.ts';
import { db } from './db.ts';
import { HttpProblem } from './http.ts';
import { dummyHash, verifyPassword } from './passwords.ts';

export interface SessionUser {
  id: number;
  username: string;
  displayName: string;
  role: Role;
  /** How the request is authenticated. */
  via: 'session' | 'token';
  tokenId?: number;
  /** Someone else chose this user's password: only the change-password page and API are open. */
  mustChangePassword?: boolean;
}

const adapter: Adapter = {
  async getSessionAndUser(sessionId) {
    db();
    const s = await UserSession.findByPk(sessionKey(sessionId));
    if (!s) return [null, null];
    // Absolute lifetime: however often it is used, a session ends this long after sign-in.
    if (Date.now() - s.createdAt.getTime() > SESSION_ABSOLUTE_MS) {
      await UserSession.destroy({ where: { id: s.id } });
      return [null, null];
    }
    const u = await User.findByPk(s.userId);
    if (!u || !u.active) return [null, null];
    // lucia keeps working with the cookie's id; only its hash is in the table.
    const session: DatabaseSession = { id: sessionId, userId: s.userId, expiresAt: s.expiresAt, attributes: {} };
    const user: DatabaseUser = {
      id: u.id,
      attributes: {
        username: u.username,
        displayName: u.displayName,
        role: u.role,
        mustChangePassword: u.mustChangePassword,
      },
    };
    return [session, user];
  },
  async getUserSessions(userId) {
    db();
    const rows = await UserSession.findAll({ where: { userId: userId as number } });
    return rows.map((s) => ({ id: s.id, userId: s.userId, expiresAt: s.expiresAt, attributes: {} }));
  },
  async setSession(session) {
    db();
    await UserSession.create({ id: sessionKey(session.id), userId: session.userId as number, expiresAt: session.expiresAt });
  },
  async updateSessionExpiration(sessionId, expiresAt) {
    db();
    await UserSession.update({ expiresAt }, { where: { id: sessionKey(sessionId) } });
  },
  async deleteSession(sessionId) {
    db();
    await UserSession.destroy({ where: { id: sessionKey(sessionId) } });
  },
  async deleteUserSessions(userId) {
    db();
    await UserSession.destroy({ where: { userId: userId as number } });
  },
  async deleteExpiredSessions() {
    db();
    await UserSession.destroy({ where: { expiresAt: { [Op.lt]: new Date() } } });
  },
};

/** Longest a session lives from sign-in, however often it is used (two shifts). */
export const SESSION_ABSOLUTE_MS = 24 * 3_600_000;

/** A shift plus margin; lucia extends a session used in its second half (sliding expiry). */
const SESSION_LIFETIME = new TimeSpan(12, 'h');

export const lucia = new Lucia(adapter, {
  sessionExpiresIn: SESSION_LIFETIME,
  sessionCookie: { name: 'coatrail_session', attributes: { sameSite: 'lax', secure: false } },
  getUserAttributes: (a) => ({
    username: a.username,
    displayName: a.displayName,
    role: a.role,
    mustChangePassword: a.mustChangePassword,
  }),
});

declare module 'lucia' {
  interface Register {
    Lucia: typeof lucia;
    UserId: number;
    DatabaseUserAttributes: { username: string; displayName: string; role: Role; mustChangePassword: boolean };
  }
}

/**
 * A new session's id and expiry, as lucia makes them (`createSession`), for a sign-in that
 * stores the session and its audit row in one transaction.
 */
export function newSession(userId: number): { id: string; userId: number; expiresAt: Date } {
  return { id: generateIdFromEntropySize(25), userId, expiresAt: new Date(Date.now() + SESSION_LIFETIME.milliseconds()) };
}

/**
 * Whether cookies get the Secure attribute: when the request came over HTTPS, or when the
 * public origin is HTTPS (TLS ended at a reverse proxy). Plain http on loopback gets none,
 * or the browser would drop the cookie.
 */
export function secureCookies(url: URL): boolean {
  return url.protocol === 'https:' || (config.publicOrigin ?? '').startsWith('https:');
}

export const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

/** Resolve `Authorization: Bearer <token>`; null when absent, a 401 problem when wrong. */
export async function userFromBearer(header: string | null, address: string | null): Promise<SessionUser | null> {
  if (!header) return null;
  const m = /^Bearer\s+(\S+)$/i.exec(header);
  if (!m?.[1]) throw new HttpProblem(401, 'Not signed in', 'The Authorization header must be "Bearer <token>".');
  db();
  const token = await ApiToken.findOne({ where: { tokenHash: sha256(m[1]) } });
  if (!token || token.revokedAt) throw new HttpProblem(401, 'Not signed in', 'The API token is unknown or revoked.');
  const now = new Date();
  if (token.expiresAt.getTime() <= now.getTime()) throw new HttpProblem(401, 'Not signed in', 'The API token has expired.');
  // A token lives only as long as its creator may hold its role: deactivation or demotion ends it.
  const creator = await User.findByPk(token.createdBy);
  if (!creator || !creator.active || !mayHoldToken(creator.role, token.role)) {
    throw new HttpProblem(401, 'Not signed in', 'The API token’s issuer is no longer active in a role that may hold it.');
  }
  // Record last use at most once a minute per token.
  if (!token.lastUsedAt || now.getTime() - token.lastUsedAt.getTime() > 60_000) {
    await ApiToken.update({ lastUsedAt: now }, { where: { id: token.id } });
    void address;
  }
  return {
    id: token.createdBy,
    username: `token:${token.name}`,
    displayName: `API token “${token.name}” (issued by ${creator?.username ?? 'unknown'})`,
    role: token.role,
    via: 'token',
    tokenId: token.id,
  };
}

/** Whether a creator in `creatorRole` may (still) hold a token of `tokenRole`: admins any, others their own or viewer. */
function mayHoldToken(creatorRole: Role, tokenRole: Role): boolean {
  return creatorRole === 'admin' || creatorRole === tokenRole || tokenRole === 'viewer';
}

/** A new API token: the secret is returned once, only its hash is stored. */
export function newTokenSecret(): { secret: string; hash: string; prefix: string } {
  const secret = 'ct_' + randomBytes(24).toString('base64url');
  return { secret, hash: sha256(secret), prefix: secret.slice(0, 8) };
}

// --- brute-force protection -------------------------------------------------------------

/** Policy (common practice, cf. OWASP Authentication Cheat Sheet): slow after 3, lock after 8. */
export const THROTTLE = {
  slowAfter: 3,
  slowAfterAddress: 20,
  slowStepMs: 500,
  slowMaxMs: 3_000,
  lockAfterUser: 8,
  /** High: a lab's staff often share one address (a proxy or NAT); this stops only a flood. */
  lockAfterAddress: 100,
  lockMinutes: 15,
  resetAfterMinutes: 60,
};

async function throttleState(key: string) {
  const row = await LoginThrottle.findByPk(key);
  if (!row) return { failures: 0, lockedUntil: null as Date | null };
  const stale = row.lastFailureAt && Date.now() - row.lastFailureAt.getTime() > THROTTLE.resetAfterMinutes * 60_000;
  return { failures: stale ? 0 : row.failures, lockedUntil: row.lockedUntil };
}

/**
 * Count one failure for `key` in a single statement (concurrent failures cannot be lost) and
 * lock it when the count reaches `lockAfter`. Each new lock (also a re-lock after one ran out)
 * is audited as `auth.locked`.
 */
async function recordFailure(key: string, lockAfter: number, address: string | null): Promise<void> {
  await recordFailureRecord(
    db(),
    key,
    { lockAfter, lockMinutes: THROTTLE.lockMinutes, resetAfterMinutes: THROTTLE.resetAfterMinutes },
    address,
  );
}

/** The active lock on any of `keys`, as a 429 problem. */
async function refuseIfLocked(keys: readonly string[]): Promise<Array<{ failures: number; lockedUntil: Date | null }>> {
  const states = await Promise.all(keys.map(throttleState));
  const now = Date.now();
  for (const st of states) {
    if (st.lockedUntil && st.lockedUntil.getTime() > now) {
      const minutes = Math.ceil((st.lockedUntil.getTime() - now) / 60_000);
      throw new HttpProblem(
        429,
        'Too many failed sign-ins',
        `Sign-in is locked for about ${minutes} more minute(s). An administrator can see the lock and lift it.`,
      );
    }
  }
  return states;
}

const sleep = (ms: number) => (ms > 0 ? new Promise((r) => setTimeout(r, ms)) : Promise.resolve());

/** Delay before answering after `failures` earlier failures: one step per failure beyond `after - 1`, capped. */
export function throttleDelay(failures: number, after: number): number {
  return Math.min(THROTTLE.slowMaxMs, Math.max(0, failures - after + 1) * THROTTLE.slowStepMs);
}

/** Throttle keys of a sign-in attempt. */
export const throttleKeys = (username: string, address: string | null) =>
  [`user:${username.trim().toLowerCase()}`, `ip:${address ?? 'unknown'}`] as const;

const LOGIN_FAILED = 'The username or password is not right, or the account is not active.';

/**
 * Check a username and password with throttling. Every failure gives the same message
 * (no user enumeration); a locked key answers 429.
 */
export async function checkCredentials(username: string, password: string, address: string | null): Promise<User> {
  db();
  const uname = username.trim().toLowerCase();
  const keys = throttleKeys(uname, address);
  const [us, as] = await refuseIfLocked(keys);
  // Slow down after a few failures of this user, whether or not the password is right now.
  await sleep(throttleDelay(us!.failures, THROTTLE.slowAfter));
  const user = await User.findOne({ where: { username: uname } });
  const ok = user
    ? await verifyPassword(user.passwordHash, password)
    : (await verifyPassword(await dummyHash(), password), false);
  if (!user || !ok || !user.active) {
    await recordFailure(keys[0], THROTTLE.lockAfterUser, address);
    await recordFailure(keys[1], THROTTLE.lockAfterAddress, address);
    await recordAuditEvent(
      db(),
      { id: user?.id ?? null, label: uname || '(blank)', address },
      { action: 'auth.failed', entity: 'login', entityId: uname },
    );
    // An address that keeps failing gets slower failure answers (people behind the same
    // address who sign in correctly are not slowed).
    await sleep(throttleDelay(as!.failures, THROTTLE.slowAfterAddress));
    throw new HttpProblem(401, 'Sign-in failed', LOGIN_FAILED);
  }
  await LoginThrottle.destroy({ where: { key: keys[0] } });
  return user;
}

/**
 * Electronic signature: the signer re-enters the password; returns what is stored with the
 * signed record (printed name, date-time, meaning — 21 CFR 11.50).
 */
export async function signWithPassword(
  actor: SessionUser,
  password: string,
  meaning: string,
  address: string | null,
): Promise<SignatureRecord> {
  if (actor.via !== 'session') throw new HttpProblem(403, 'Signature needs a person', 'An API token cannot sign records.');
  const what = meaning.trim();
  if (!what) {
    throw new HttpProblem(400, 'Invalid input', 'meaning: State the meaning of the signature.', {
      errors: [{ path: 'meaning', message: 'State the meaning of the signature.' }],
    });
  }
  db();
  const user = await User.findByPk(actor.id);
  // A signature attempt counts towards the same lock as sign-in: a walk-up guesser at an
  // unattended session is slowed and locked out the same way.
  const key = throttleKeys(user?.username ?? actor.username, address)[0];
  await refuseIfLocked([key]);
  if (!user || !user.active || !(await verifyPassword(user.passwordHash, password))) {
    await recordFailure(key, THROTTLE.lockAfterUser, address);
    await recordAuditEvent(
      db(),
      { id: actor.id, label: actor.username, address },
      { action: 'signature.failed', entity: 'signature', after: { meaning: what } },
    );
    throw new HttpProblem(403, 'Signature refused', 'The password does not match the signed-in user.', {
      errors: [{ path: 'password', message: 'The password does not match.' }],
    });
  }
  await LoginThrottle.destroy({ where: { key } });
  // 21 CFR 11.50(a): printed name of the signer, date and time of signing, meaning.
  return {
    userId: user.id,
    username: user.username,
    displayName: user.displayName,
    meaning: what,
    signedAt: new Date().toISOString(),
  };
}
