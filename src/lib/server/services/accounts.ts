/**
 * People and machine clients: users (create, role, deactivate — never delete), password
 * resets by e-mailed one-time link, API tokens, sign-in locks, caught e-mail. Every change is
 * audited with before → after (secrets and hashes never enter the trail).
 */
import { randomBytes } from 'node:crypto';
import { Op, QueryTypes, UniqueConstraintError } from 'sequelize';
import { ApiToken, LoginThrottle, PasswordReset, User, UserSession } from '../../../../db/models/index.ts';
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
import { audit, type Actor } from '../audit.ts';
import { newTokenSecret, sha256 } from '../auth.ts';
import { config } from '../config.ts';
import { db } from '../db.ts';
import { HttpProblem } from '../http.ts';
import { sendMail } from '../mail.ts';
import { hashPassword } from '../passwords.ts';

const iso = (d: Date | string | null | undefined) => (d == null ? null : new Date(d).toISOString());

/** What the audit trail keeps of a user (no password hash). */
const userSnapshot = (u: User) => ({
  username: u.username,
  displayName: u.displayName,
  email: u.email,
  role: u.role,
  active: u.active,
});

// --- users ----------------------------------------------------------------------------

export async function listUsers(): Promise<UserView[]> {
  const rows = await db().query<{
    id: number;
    username: string;
    display_name: string;
    email: string | null;
    role: Role;
    active: boolean;
    created_at: Date;
    last_sign_in_at: Date | null;
    sessions: string;
  }>(
    `select u.id, u.username, u.display_name, u.email, u.role, u.active, u.created_at,
            (select max(at) from audit_log a where a.action = 'auth.signed-in' and a.entity = 'user' and a.entity_id = u.id::text) as last_sign_in_at,
            (select count(*) from user_sessions s where s.user_id = u.id and s.expires_at > now()) as sessions
       from users u order by u.active desc, u.username`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    id: r.id,
    username: r.username,
    displayName: r.display_name,
    email: r.email,
    role: r.role,
    active: r.active,
    createdAt: iso(r.created_at)!,
    lastSignInAt: iso(r.last_sign_in_at),
    sessions: Number(r.sessions),
  }));
}

async function findUser(id: number): Promise<User> {
  db();
  const u = await User.findByPk(id);
  if (!u) throw new HttpProblem(404, 'Not found', 'No such user.');
  return u;
}

export async function createUser(actor: Actor, input: CreateUser, origin: string): Promise<{ user: UserView; invited: boolean }> {
  const seq = db();
  // Without an initial password the account gets an unusable random one and an e-mailed link.
  const passwordHash = await hashPassword(input.password ?? randomBytes(32).toString('base64url'));
  let user: User;
  try {
    user = await seq.transaction(async (transaction) => {
      const u = await User.create(
        { username: input.username, displayName: input.displayName, email: input.email, role: input.role, passwordHash },
        { transaction },
      );
      await audit(
        actor,
        { action: 'user.created', entity: 'user', entityId: u.id, before: null, after: userSnapshot(u) },
        transaction,
      );
      return u;
    });
  } catch (e) {
    if (e instanceof UniqueConstraintError) {
      throw new HttpProblem(409, 'Username taken', `There is already a user “${input.username}”.`, {
        errors: [{ path: 'username', message: 'This username is taken (also by deactivated users).' }],
      });
    }
    throw e;
  }
  let invited = false;
  if (!input.password) {
    await issueReset(user, actor, origin, 'invite');
    invited = true;
  }
  const view = (await listUsers()).find((u) => u.id === user.id)!;
  return { user: view, invited };
}

async function activeAdmins(): Promise<number> {
  return User.count({ where: { role: 'admin', active: true } });
}

export async function updateUser(actor: Actor, id: number, input: UpdateUser): Promise<UserView> {
  const seq = db();
  const u = await findUser(id);
  const before = userSnapshot(u);
  if (actor.id === id && (input.active === false || (input.role && input.role !== u.role))) {
    throw new HttpProblem(
      409,
      'Not on your own account',
      'Ask another administrator to change your own role or to deactivate you.',
      {
        errors: [{ path: input.active === false ? 'active' : 'role', message: 'Not on your own account.' }],
      },
    );
  }
  const losesAdmin = u.role === 'admin' && u.active && ((input.role && input.role !== 'admin') || input.active === false);
  if (losesAdmin && (await activeAdmins()) <= 1) {
    throw new HttpProblem(409, 'Last administrator', 'Keep at least one active administrator.', {
      errors: [{ path: 'role', message: 'The last active administrator.' }],
    });
  }
  await seq.transaction(async (transaction) => {
    if (input.displayName !== undefined) u.displayName = input.displayName;
    if (input.email !== undefined) u.email = input.email;
    if (input.role !== undefined) u.role = input.role;
    if (input.active !== undefined) u.active = input.active;
    u.updatedAt = new Date();
    await u.save({ transaction });
    // Deactivation ends every session at once (records keep the user as their author).
    if (input.active === false) await UserSession.destroy({ where: { userId: id }, transaction });
    const after = userSnapshot(u);
    const action =
      input.active === false && before.active
        ? 'user.deactivated'
        : input.active === true && !before.active
          ? 'user.reactivated'
          : input.role && input.role !== before.role
            ? 'user.role-changed'
            : 'user.updated';
    await audit(actor, { action, entity: 'user', entityId: id, before, after }, transaction);
  });
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
  await db().transaction(async (transaction) => {
    await PasswordReset.update({ usedAt: new Date() }, { where: { userId: user.id, usedAt: null }, transaction });
    const r = await PasswordReset.create({ userId: user.id, tokenHash: sha256(token), expiresAt, usedAt: null }, { transaction });
    await audit(
      actor,
      {
        action: 'user.password-reset-sent',
        entity: 'user',
        entityId: user.id,
        after: { resetId: r.id, kind, to: user.email, expiresAt: expiresAt.toISOString() },
      },
      transaction,
    );
  });
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
    await audit(
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
  const seq = db();
  const passwordHash = await hashPassword(password);
  const result = await seq.transaction(async (transaction) => {
    // Claim the link in one statement, so two concurrent uses cannot both succeed.
    const [claimed] = await seq.query<{ id: number; user_id: number }>(
      `update password_resets set used_at = now()
        where token_hash = :h and used_at is null and expires_at > now()
        returning id, user_id`,
      { replacements: { h: sha256(token) }, type: QueryTypes.SELECT, transaction },
    );
    if (!claimed) return null;
    const u = await User.findByPk(claimed.user_id, { transaction });
    if (!u || !u.active) return null;
    u.passwordHash = passwordHash;
    u.updatedAt = new Date();
    await u.save({ transaction });
    await UserSession.destroy({ where: { userId: u.id }, transaction });
    await LoginThrottle.destroy({ where: { key: `user:${u.username}` }, transaction });
    await audit(
      { id: u.id, label: u.username, address },
      { action: 'user.password-set', entity: 'user', entityId: u.id, after: { resetId: claimed.id, via: 'e-mailed link' } },
      transaction,
    );
    return { username: u.username };
  });
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
  const rows = await db().query<{
    id: number;
    name: string;
    role: Role;
    prefix: string;
    created_at: Date;
    created_by: string;
    last_used_at: Date | null;
    revoked_at: Date | null;
  }>(
    `select t.id, t.name, t.role, t.prefix, t.created_at, coalesce(u.username, '?') as created_by, t.last_used_at, t.revoked_at
       from api_tokens t left join users u on u.id = t.created_by
      order by t.revoked_at is not null, t.created_at desc`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    role: r.role,
    prefix: r.prefix,
    createdAt: iso(r.created_at)!,
    createdBy: r.created_by,
    lastUsedAt: iso(r.last_used_at),
    revokedAt: iso(r.revoked_at),
  }));
}

/** Create a token; the secret is in the answer this once and never again. */
export async function createToken(actor: Actor, input: { name: string; role: Role }): Promise<TokenView & { secret: string }> {
  if (actor.id == null) throw new HttpProblem(403, 'Not allowed', 'A token needs a person who issues it.');
  const { secret, hash, prefix } = newTokenSecret();
  const t = await db().transaction(async (transaction) => {
    const row = await ApiToken.create(
      { name: input.name, role: input.role, tokenHash: hash, prefix, createdBy: actor.id!, lastUsedAt: null, revokedAt: null },
      { transaction },
    );
    await audit(
      actor,
      {
        action: 'token.created',
        entity: 'api-token',
        entityId: row.id,
        before: null,
        after: { name: row.name, role: row.role, prefix },
      },
      transaction,
    );
    return row;
  });
  const view = (await listTokens()).find((x) => x.id === t.id)!;
  return { ...view, secret };
}

export async function revokeToken(actor: Actor, id: number): Promise<TokenView> {
  db();
  const t = await ApiToken.findByPk(id);
  if (!t) throw new HttpProblem(404, 'Not found', 'No such API token.');
  if (t.revokedAt)
    throw new HttpProblem(409, 'Already revoked', `The token “${t.name}” was revoked at ${t.revokedAt.toISOString()}.`);
  await db().transaction(async (transaction) => {
    t.revokedAt = new Date();
    await t.save({ transaction });
    await audit(
      actor,
      {
        action: 'token.revoked',
        entity: 'api-token',
        entityId: id,
        before: { name: t.name, role: t.role, revokedAt: null },
        after: { name: t.name, role: t.role, revokedAt: t.revokedAt.toISOString() },
      },
      transaction,
    );
  });
  return (await listTokens()).find((x) => x.id === id)!;
}

// --- sign-in locks ----------------------------------------------------------------------

/** Sign-in throttles with failures in the last day or an active lock. */
export async function listLocks(): Promise<LockView[]> {
  const rows = await db().query<{ key: string; failures: number; last_failure_at: Date | null; locked_until: Date | null }>(
    `select key, failures, last_failure_at, locked_until from login_throttles
      where (locked_until is not null and locked_until > now()) or last_failure_at > now() - interval '1 day'
      order by (locked_until is not null and locked_until > now()) desc, last_failure_at desc nulls last`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => {
    const locked = !!r.locked_until && new Date(r.locked_until).getTime() > Date.now();
    const [kind, ...rest] = r.key.split(':');
    return {
      key: r.key,
      kind: kind === 'ip' ? 'address' : 'user',
      subject: rest.join(':'),
      failures: r.failures,
      lastFailureAt: iso(r.last_failure_at),
      lockedUntil: locked ? iso(r.locked_until) : null,
      locked,
    };
  });
}

/** Lift a lock (and forget the failures behind it). */
export async function unlock(actor: Actor, key: string): Promise<void> {
  db();
  const row = await LoginThrottle.findByPk(key);
  if (!row)
    throw new HttpProblem(404, 'Not found', 'There is no lock or failure count for that key.', {
      errors: [{ path: 'key', message: 'Unknown key.' }],
    });
  await db().transaction(async (transaction) => {
    await LoginThrottle.destroy({ where: { key }, transaction });
    await audit(
      actor,
      {
        action: 'auth.unlocked',
        entity: 'login',
        entityId: key,
        before: { failures: row.failures, lockedUntil: iso(row.lockedUntil) },
        after: { failures: 0, lockedUntil: null },
      },
      transaction,
    );
  });
}

// --- caught e-mail --------------------------------------------------------------------

export async function listCaughtMail(limit = 200): Promise<MailView[]> {
  const rows = await db().query<{
    id: number;
    caught_at: Date;
    mail_from: string | null;
    mail_to: string;
    subject: string | null;
    body: string;
  }>(`select id, caught_at, mail_from, mail_to, subject, body from outbox_mail order by id desc limit :limit`, {
    replacements: { limit },
    type: QueryTypes.SELECT,
  });
  return rows.map((r) => ({
    id: r.id,
    caughtAt: iso(r.caught_at)!,
    from: r.mail_from,
    to: r.mail_to,
    subject: r.subject,
    body: r.body,
  }));
}
