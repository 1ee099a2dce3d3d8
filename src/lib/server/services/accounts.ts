/**
 * People and machine clients: users (create, role, deactivate — never delete), password
 * resets by e-mailed one-time link, API tokens, sign-in locks, caught e-mail. Every change is
 * audited with before → after (secrets and hashes never enter the trail).
 */
import { randomBytes } from 'node:crypto';
import { Op, col, fn, literal } from 'sequelize';
import {
  ApiToken,
  AuditEntry,
  LoginThrottle,
  OutboxMail,
  PasswordReset,
  User,
  UserSession,
} from '../../../../db/models/index.ts';
import type { AuditActor as Actor } from '../../../../db/transaction.ts';
import {
  changeOwnPasswordRecord,
  completeResetRecord,
  createTokenRecord,
  createUserRecord,
  issueResetRecord,
  recordAuditEvent,
  revokeTokenRecord,
  unlockRecord,
  updateUserRecord,
} from '../../core/accounts-store.ts';
import {
  RESET_LINK_MINUTES,
  type CreateUser,
  type LockView,
  type MailView,
  type TokenView,
  type UpdateUser,
  type UserView,
} from '../../shared/admin.ts';
import { ROLE_LABELS, type Role } from '../../shared/roles.ts';
import { newTokenSecret, sha256, signWithPassword, type SessionUser } from '../auth.ts';
import { config } from '../config.ts';
import { db } from '../db.ts';
import { HttpProblem } from '../http.ts';
import { sendMail } from '../mail.ts';
import { hashPassword } from '../passwords.ts';

const iso = (d: Date | string | null | undefined) => (d == null ? null : new Date(d).toISOString());

// --- users ----------------------------------------------------------------------------

export async function listUsers(): Promise<UserView[]> {
  db();
  const [users, sessions, signIns] = await Promise.all([
    User.findAll({
      order: [
        ['active', 'DESC'],
        ['username', 'ASC'],
      ],
    }),
    UserSession.findAll({
      attributes: ['userId', [fn('count', col('id')), 'n']],
      where: { expiresAt: { [Op.gt]: new Date() } },
      group: ['userId'],
      raw: true,
    }) as unknown as Promise<Array<{ userId: number; n: number | string }>>,
    AuditEntry.findAll({
      attributes: ['entityId', [fn('max', col('at')), 'at']],
      where: { action: 'auth.signed-in', entity: 'user' },
      group: ['entityId'],
      raw: true,
    }) as unknown as Promise<Array<{ entityId: string; at: Date }>>,
  ]);
  const sessionCount = new Map(sessions.map((r) => [r.userId, Number(r.n)]));
  const lastSignIn = new Map(signIns.map((r) => [r.entityId, r.at]));
  return users.map((u) => ({
    id: u.id,
    username: u.username,
    displayName: u.displayName,
    email: u.email,
    role: u.role,
    active: u.active,
    createdAt: iso(u.createdAt)!,
    lastSignInAt: iso(lastSignIn.get(String(u.id))),
    sessions: sessionCount.get(u.id) ?? 0,
  }));
}

async function findUser(id: number): Promise<User> {
  db();
  const u = await User.findByPk(id);
  if (!u) throw new HttpProblem(404, 'Not found', 'No such user.');
  return u;
}

export async function createUser(actor: Actor, input: CreateUser, origin: string): Promise<{ user: UserView; invited: boolean }> {
  // Without an initial password the account gets an unusable random one and an e-mailed link.
  const passwordHash = await hashPassword(input.password ?? randomBytes(32).toString('base64url'));
  const user = await createUserRecord(db(), actor, {
    username: input.username,
    displayName: input.displayName,
    email: input.email,
    role: input.role,
    passwordHash,
    // A password the admin chose is known to the admin: the user must replace it at first sign-in.
    mustChangePassword: Boolean(input.password),
  });
  let invited = false;
  if (!input.password) {
    await issueReset(user, actor, origin, 'invite');
    invited = true;
  }
  const view = (await listUsers()).find((u) => u.id === user.id)!;
  return { user: view, invited };
}

export async function updateUser(actor: Actor, id: number, input: UpdateUser): Promise<UserView> {
  await updateUserRecord(db(), actor, id, input);
  return (await listUsers()).find((x) => x.id === id)!;
}

// --- password resets ------------------------------------------------------------------

function resetLink(origin: string, token: string): string {
  return `${config.publicOrigin ?? origin}/reset-password?token=${encodeURIComponent(token)}`;
}

/**
 * Issue a one-time link (only its SHA-256 is stored), cancel older unused links of the same
 * user, and e-mail it. `kind` 'invite' words the mail for a new account.
 */
async function issueReset(user: User, actor: Actor, origin: string, kind: 'admin' | 'self' | 'invite'): Promise<void> {
  if (!user.email)
    throw new HttpProblem(400, 'No e-mail address', `${user.username} has no e-mail address; add one first.`, {
      errors: [{ path: 'email', message: 'No e-mail address.' }],
    });
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(Date.now() + RESET_LINK_MINUTES * 60_000);
  await issueResetRecord(db(), actor, { userId: user.id, tokenHash: sha256(token), expiresAt, kind, to: user.email });
  const link = resetLink(origin, token);
  const intro =
    kind === 'invite'
      ? `An administrator has created a Coatrail account for you (username “${user.username}”, role ${ROLE_LABELS[user.role]}).\nSet your password here:`
      : kind === 'admin'
        ? `An administrator has asked Coatrail to let you set a new password for the account “${user.username}”.\nSet it here:`
        : `Someone (we hope you) asked to set a new password for the Coatrail account “${user.username}”.\nSet it here:`;
  await sendMail({
    to: user.email,
    subject: kind === 'invite' ? 'Your Coatrail account' : 'Set a new Coatrail password',
    text: `Hello ${user.displayName},\n\n${intro}\n\n${link}\n\nThe link works once and expires in ${RESET_LINK_MINUTES} minutes (at ${expiresAt.toISOString()}).\nIf you did not expect this message, ignore it; your password stays as it is.\n\n— Coatrail`,
  });
}

/** Admin: e-mail a user a one-time link to set a new password. */
export async function adminSendReset(
  actor: Actor,
  id: number,
  origin: string,
): Promise<{ to: string; expiresInMinutes: number }> {
  const u = await findUser(id);
  if (!u.active)
    throw new HttpProblem(409, 'User deactivated', 'Reactivate the user before sending a reset link.', {
      errors: [{ path: 'active', message: 'Deactivated.' }],
    });
  await issueReset(u, actor, origin, 'admin');
  return { to: u.email!, expiresInMinutes: RESET_LINK_MINUTES };
}

/**
 * Public "forgot password". Always resolves the same way, whether or not the account exists;
 * the e-mail goes out in the background so the answer's timing does not tell either. At most
 * one link per account every two minutes.
 */
export async function requestReset(login: string, origin: string, address: string | null): Promise<void> {
  db();
  const value = login.trim().toLowerCase();
  const run = async () => {
    const users = await User.findAll({ where: value.includes('@') ? { email: value } : { username: value } });
    const u = users.length === 1 ? users[0]! : null;
    await recordAuditEvent(
      db(),
      { id: u?.id ?? null, label: value.slice(0, 80) || '(blank)', address },
      {
        action: 'auth.reset-requested',
        entity: 'login',
        entityId: value.slice(0, 80),
        after: { matched: !!u && u.active && !!u.email },
      },
    );
    if (!u || !u.active || !u.email) return;
    const recent = await PasswordReset.count({ where: { userId: u.id, createdAt: { [Op.gt]: new Date(Date.now() - 120_000) } } });
    if (recent > 0) return;
    await issueReset(u, { id: u.id, label: u.username, address }, origin, 'self');
  };
  void run().catch((e: Error) => console.error(`[web] forgot-password mail failed: ${e.message}`));
}

/** Whether a reset link is still good (for the page, before asking for the new password). */
export async function checkResetToken(token: string): Promise<'ok' | 'used' | 'expired' | 'unknown'> {
  db();
  const r = await PasswordReset.findOne({ where: { tokenHash: sha256(token) } });
  if (!r) return 'unknown';
  if (r.usedAt) return 'used';
  if (r.expiresAt.getTime() <= Date.now()) return 'expired';
  return 'ok';
}

const RESET_REFUSED: Record<'used' | 'expired' | 'unknown', string> = {
  used: 'This link has already been used. Ask for a new one.',
  expired: `This link has expired (links work for ${RESET_LINK_MINUTES} minutes). Ask for a new one.`,
  unknown: 'This link is not valid. Ask for a new one.',
};

/** Set a new password through a one-time link: single use, expiring; ends the user's sessions. */
export async function completeReset(token: string, password: string, address: string | null): Promise<{ username: string }> {
  const passwordHash = await hashPassword(password);
  const result = await completeResetRecord(db(), { tokenHash: sha256(token), passwordHash, address });
  if (!result) {
    const state = await checkResetToken(token);
    const why = state === 'ok' ? 'unknown' : state;
    throw new HttpProblem(why === 'unknown' ? 400 : 410, 'Link not usable', RESET_REFUSED[why], {
      errors: [{ path: 'token', message: RESET_REFUSED[why] }],
    });
  }
  return result;
}

export function resetRefusal(state: 'used' | 'expired' | 'unknown'): string {
  return RESET_REFUSED[state];
}

// --- API tokens -----------------------------------------------------------------------

export async function listTokens(): Promise<TokenView[]> {
  db();
  const rows = await ApiToken.findAll({
    include: [{ model: User, as: 'creator', attributes: ['username'] }],
    order: [
      [literal('revoked_at is not null'), 'ASC'],
      ['createdAt', 'DESC'],
    ],
  });
  return rows.map((t) => ({
    id: t.id,
    name: t.name,
    role: t.role,
    prefix: t.prefix,
    createdAt: iso(t.createdAt)!,
    createdBy: (t as ApiToken & { creator?: User | null }).creator?.username ?? '?',
    lastUsedAt: iso(t.lastUsedAt),
    revokedAt: iso(t.revokedAt),
    expiresAt: iso(t.expiresAt)!,
  }));
}

/** Create a token; the secret is in the answer this once and never again. */
export async function createToken(
  actor: Actor,
  input: { name: string; role: Role; expiresInDays?: number },
): Promise<TokenView & { secret: string }> {
  if (actor.id == null) throw new HttpProblem(403, 'Not allowed', 'A token needs a person who issues it.');
  const { secret, hash, prefix } = newTokenSecret();
  const expiresAt = new Date(Date.now() + (input.expiresInDays ?? 90) * 86_400_000);
  const t = await createTokenRecord(db(), actor, { name: input.name, role: input.role, tokenHash: hash, prefix, expiresAt });
  const view = (await listTokens()).find((x) => x.id === t.id)!;
  return { ...view, secret };
}

export async function revokeToken(actor: Actor, id: number): Promise<TokenView> {
  await revokeTokenRecord(db(), actor, id);
  return (await listTokens()).find((x) => x.id === id)!;
}

// --- sign-in locks ----------------------------------------------------------------------

/** Sign-in throttles with failures in the last day or an active lock. */
export async function listLocks(): Promise<LockView[]> {
  db();
  const now = Date.now();
  const rows = await LoginThrottle.findAll({
    where: {
      [Op.or]: [{ lockedUntil: { [Op.gt]: new Date(now) } }, { lastFailureAt: { [Op.gt]: new Date(now - 86_400_000) } }],
    },
    order: [
      [literal('(locked_until is not null and locked_until > now())'), 'DESC'],
      [literal('last_failure_at'), 'DESC NULLS LAST'],
    ],
  });
  return rows.map((r) => {
    const locked = !!r.lockedUntil && r.lockedUntil.getTime() > now;
    const [kind, ...rest] = r.key.split(':');
    return {
      key: r.key,
      kind: kind === 'ip' ? 'address' : 'user',
      subject: rest.join(':'),
      failures: r.failures,
      lastFailureAt: iso(r.lastFailureAt),
      lockedUntil: locked ? iso(r.lockedUntil) : null,
      locked,
    };
  });
}

/** Lift a lock (and forget the failures behind it). */
export async function unlock(actor: Actor, key: string): Promise<void> {
  await unlockRecord(db(), actor, key);
}

// --- caught e-mail --------------------------------------------------------------------

export async function listCaughtMail(limit = 200): Promise<MailView[]> {
  db();
  const rows = await OutboxMail.findAll({ order: [['id', 'DESC']], limit });
  return rows.map((r) => ({
    id: r.id,
    caughtAt: iso(r.caughtAt)!,
    from: r.mailFrom,
    to: r.mailTo,
    subject: r.subject,
    body: r.body,
  }));
}

/**
 * The signed-in person replaces their own password (the current one re-entered, checked and
 * throttled like a signature). Clears the must-change flag and ends their other sessions.
 */
export async function changeOwnPassword(
  user: SessionUser,
  sessionId: string | null,
  input: { currentPassword: string; newPassword: string },
  address: string | null,
): Promise<void> {
  if (user.via !== 'session') throw new HttpProblem(403, 'Needs a signed-in person', 'An API token cannot change a password.');
  await signWithPassword(user, input.currentPassword, 'password change', address);
  const passwordHash = await hashPassword(input.newPassword);
  await changeOwnPasswordRecord(db(), { id: user.id, label: user.username, address }, { passwordHash, keepSessionId: sessionId });
}
