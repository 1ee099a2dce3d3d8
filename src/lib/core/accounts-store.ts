/**
 * People and sign-in records (worker-safe: no Astro, the caller passes its Sequelize instance):
 * users, sessions, password-reset links, API tokens and sign-in throttles. Every change and
 * its audit row commit together (`withTransaction` + `auditIn`). Secrets never enter the
 * trail: only hashes are stored, and the audit rows hold neither secrets nor hashes.
 */
import { createHash } from 'node:crypto';
import { Op, QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import { ApiToken, LoginThrottle, PasswordReset, User, UserSession, type RoleName } from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor, type AuditRecord } from '../../../db/transaction.ts';
import { DomainError } from './errors.ts';

/** What the audit trail keeps of a user (no password hash). */
export const userSnapshot = (u: User) => ({
  username: u.username,
  displayName: u.displayName,
  email: u.email,
  role: u.role,
  active: u.active,
});

const iso = (d: Date | null | undefined) => (d == null ? null : d.toISOString());

/**
 * An event that changes nothing but the trail itself (a failed sign-in, a reset request, a
 * refused signature), written through the one primitive like every other audit row.
 */
export async function recordAuditEvent(sequelize: Sequelize, actor: AuditActor, record: AuditRecord): Promise<void> {
  await withTransaction(sequelize, (t) => auditIn(t, actor, record));
}

// --- users ----------------------------------------------------------------------------

export interface NewUser {
  username: string;
  displayName: string;
  email: string | null;
  role: RoleName;
  passwordHash: string;
  /** True when the creator chose the password (the user must set their own at first sign-in). */
  mustChangePassword?: boolean;
}

/** Create a user; a taken username (also of a deactivated user) is a conflict on `username`. */
export async function createUserRecord(sequelize: Sequelize, actor: AuditActor, input: NewUser): Promise<User> {
  try {
    return await withTransaction(sequelize, async (t) => {
      const u = await User.create(input, { transaction: t });
      await auditIn(t, actor, { action: 'user.created', entity: 'user', entityId: u.id, before: null, after: userSnapshot(u) });
      return u;
    });
  } catch (e) {
    if (e instanceof UniqueConstraintError) {
      throw new DomainError('conflict', 'Username taken', `There is already a user “${input.username}”.`, {
        errors: [{ path: 'username', message: 'This username is taken (also by deactivated users).' }],
      });
    }
    throw e;
  }
}

export interface UserChange {
  displayName?: string | undefined;
  email?: string | null | undefined;
  role?: RoleName | undefined;
  active?: boolean | undefined;
}

/**
 * Change a user's name, e-mail, role or active flag. Nobody changes their own role or
 * deactivates themselves, and the last active administrator stays one (checked under a lock
 * on the user rows, so two concurrent demotions cannot both pass). Deactivation ends every
 * session of the user in the same transaction.
 */
export async function updateUserRecord(sequelize: Sequelize, actor: AuditActor, id: number, input: UserChange): Promise<User> {
  return withTransaction(sequelize, async (t) => {
    const u = await User.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
    if (!u) throw new DomainError('not-found', 'Not found', 'No such user.');
    const before = userSnapshot(u);
    if (actor.id === id && (input.active === false || (input.role && input.role !== u.role))) {
      throw new DomainError(
        'conflict',
        'Not on your own account',
        'Ask another administrator to change your own role or to deactivate you.',
        { errors: [{ path: input.active === false ? 'active' : 'role', message: 'Not on your own account.' }] },
      );
    }
    const losesAdmin = u.role === 'admin' && u.active && ((input.role && input.role !== 'admin') || input.active === false);
    if (losesAdmin) {
      const admins = await User.findAll({ where: { role: 'admin', active: true }, transaction: t, lock: t.LOCK.UPDATE });
      if (admins.length <= 1) {
        throw new DomainError('conflict', 'Last administrator', 'Keep at least one active administrator.', {
          errors: [{ path: 'role', message: 'The last active administrator.' }],
        });
      }
    }
    if (input.displayName !== undefined) u.displayName = input.displayName;
    if (input.email !== undefined) u.email = input.email;
    if (input.role !== undefined) u.role = input.role;
    if (input.active !== undefined) u.active = input.active;
    u.updatedAt = new Date();
    await u.save({ transaction: t });
    // Deactivation ends every session at once (records keep the user as their author).
    if (input.active === false) await UserSession.destroy({ where: { userId: id }, transaction: t });
    const after = userSnapshot(u);
    const action =
      input.active === false && before.active
        ? 'user.deactivated'
        : input.active === true && !before.active
          ? 'user.reactivated'
          : input.role && input.role !== before.role
            ? 'user.role-changed'
            : 'user.updated';
    await auditIn(t, actor, { action, entity: 'user', entityId: id, before, after });
    return u;
  });
}

// --- sessions -------------------------------------------------------------------------

/** What user_sessions stores for a session id: its SHA-256 (hex), never the id itself. */
export const sessionKey = (sessionId: string) => createHash('sha256').update(sessionId).digest('hex');

/** Store a new session and audit the sign-in in one transaction. */
export async function createSessionRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  session: { id: string; userId: number; expiresAt: Date },
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    await UserSession.create({ ...session, id: sessionKey(session.id) }, { transaction: t });
    await auditIn(t, actor, { action: 'auth.signed-in', entity: 'user', entityId: session.userId });
  });
}

/** End a session and audit the sign-out in one transaction. */
export async function endSessionRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  sessionId: string,
  userId: number,
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    await UserSession.destroy({ where: { id: sessionKey(sessionId) }, transaction: t });
    await auditIn(t, actor, { action: 'auth.signed-out', entity: 'user', entityId: userId });
  });
}

// --- password resets ------------------------------------------------------------------

/**
 * Store a one-time link (only its SHA-256) for a user, cancelling older unused links of the
 * same user. `kind` and `to` go into the audit row; the token never does.
 */
export async function issueResetRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  input: { userId: number; tokenHash: string; expiresAt: Date; kind: 'admin' | 'self' | 'invite'; to: string },
): Promise<number> {
  return withTransaction(sequelize, async (t) => {
    await PasswordReset.update({ usedAt: new Date() }, { where: { userId: input.userId, usedAt: null }, transaction: t });
    const r = await PasswordReset.create(
      { userId: input.userId, tokenHash: input.tokenHash, expiresAt: input.expiresAt, usedAt: null },
      { transaction: t },
    );
    await auditIn(t, actor, {
      action: 'user.password-reset-sent',
      entity: 'user',
      entityId: input.userId,
      after: { resetId: r.id, kind: input.kind, to: input.to, expiresAt: input.expiresAt.toISOString() },
    });
    return r.id;
  });
}

/**
 * Set a new password through a one-time link: the link is claimed in one statement (two
 * concurrent uses cannot both succeed), the user's sessions end and their sign-in throttle is
 * cleared. Null when the link is unknown, used, expired or its user is deactivated.
 */
export async function completeResetRecord(
  sequelize: Sequelize,
  input: { tokenHash: string; passwordHash: string; address: string | null },
): Promise<{ username: string } | null> {
  return withTransaction(sequelize, async (t) => {
    const [claimed] = await sequelize.query<{ id: number; user_id: number }>(
      `update password_resets set used_at = now()
        where token_hash = $1 and used_at is null and expires_at > now()
        returning id, user_id`,
      { bind: [input.tokenHash], type: QueryTypes.SELECT, transaction: t },
    );
    if (!claimed) return null;
    const u = await User.findByPk(claimed.user_id, { transaction: t });
    if (!u || !u.active) return null;
    u.passwordHash = input.passwordHash;
    u.updatedAt = new Date();
    await u.save({ transaction: t });
    await UserSession.destroy({ where: { userId: u.id }, transaction: t });
    await LoginThrottle.destroy({ where: { key: `user:${u.username}` }, transaction: t });
    await auditIn(
      t,
      { id: u.id, label: u.username, address: input.address },
      { action: 'user.password-set', entity: 'user', entityId: u.id, after: { resetId: claimed.id, via: 'e-mailed link' } },
    );
    return { username: u.username };
  });
}

/**
 * A signed-in user sets their own password: the must-change flag clears, every other session of
 * the user ends (the current one stays), and the trail records it (no hashes).
 */
export async function changeOwnPasswordRecord(
  sequelize: Sequelize,
  actor: AuditActor & { id: number },
  input: { passwordHash: string; keepSessionId: string | null },
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const u = await User.findByPk(actor.id, { transaction: t, lock: t.LOCK.UPDATE });
    if (!u || !u.active) throw new DomainError('not-found', 'Not found', 'No such user.');
    const wasForced = u.mustChangePassword;
    u.passwordHash = input.passwordHash;
    u.mustChangePassword = false;
    u.updatedAt = new Date();
    await u.save({ transaction: t });
    await UserSession.destroy({
      where: input.keepSessionId ? { userId: u.id, id: { [Op.ne]: sessionKey(input.keepSessionId) } } : { userId: u.id },
      transaction: t,
    });
    await auditIn(t, actor, {
      action: 'user.password-changed',
      entity: 'user',
      entityId: u.id,
      after: { via: 'own change', wasRequired: wasForced },
    });
  });
}

// --- API tokens -----------------------------------------------------------------------

export async function createTokenRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  input: { name: string; role: RoleName; tokenHash: string; prefix: string; expiresAt?: Date },
): Promise<ApiToken> {
  // Default lifetime 90 days (TOKEN_DEFAULT_DAYS in lib/shared/admin.ts).
  const expiresAt = input.expiresAt ?? new Date(Date.now() + 90 * 86_400_000);
  if (actor.id == null) throw new DomainError('conflict', 'Not allowed', 'A token needs a person who issues it.');
  const createdBy = actor.id;
  return withTransaction(sequelize, async (t) => {
    const row = await ApiToken.create(
      {
        name: input.name,
        role: input.role,
        tokenHash: input.tokenHash,
        prefix: input.prefix,
        createdBy,
        lastUsedAt: null,
        revokedAt: null,
        expiresAt,
      },
      { transaction: t },
    );
    await auditIn(t, actor, {
      action: 'token.created',
      entity: 'api-token',
      entityId: row.id,
      before: null,
      after: { name: row.name, role: row.role, prefix: input.prefix, expiresAt: expiresAt.toISOString() },
    });
    return row;
  });
}

export async function revokeTokenRecord(sequelize: Sequelize, actor: AuditActor, id: number): Promise<ApiToken> {
  return withTransaction(sequelize, async (t) => {
    const tok = await ApiToken.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
    if (!tok) throw new DomainError('not-found', 'Not found', 'No such API token.');
    if (tok.revokedAt)
      throw new DomainError(
        'conflict',
        'Already revoked',
        `The token “${tok.name}” was revoked at ${tok.revokedAt.toISOString()}.`,
      );
    tok.revokedAt = new Date();
    await tok.save({ transaction: t });
    await auditIn(t, actor, {
      action: 'token.revoked',
      entity: 'api-token',
      entityId: id,
      before: { name: tok.name, role: tok.role, revokedAt: null },
      after: { name: tok.name, role: tok.role, revokedAt: tok.revokedAt.toISOString() },
    });
    return tok;
  });
}

// --- sign-in throttles ----------------------------------------------------------------

export interface ThrottlePolicy {
  lockAfter: number;
  lockMinutes: number;
  resetAfterMinutes: number;
}

/**
 * Count one failure for `key` in a single statement (concurrent failures cannot be lost) and
 * lock it when the count reaches `lockAfter`. Each new lock (also a re-lock after one ran out)
 * is audited as `auth.locked` in the same transaction.
 */
export async function recordFailureRecord(
  sequelize: Sequelize,
  key: string,
  policy: ThrottlePolicy,
  address: string | null,
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const [r] = await sequelize.query<{ failures: number; locked_until: Date | null; new_lock: boolean }>(
      `with prev as (select locked_until from login_throttles where key = $1),
       up as (
         insert into login_throttles as t (key, failures, last_failure_at, locked_until)
              values ($1, 1, now(), case when 1 >= $2 then now() + make_interval(mins => $3) end)
         on conflict (key) do update set
              failures = case when t.last_failure_at < now() - make_interval(mins => $4) then 1 else t.failures + 1 end,
              last_failure_at = now(),
              locked_until = case
                when (case when t.last_failure_at < now() - make_interval(mins => $4) then 1 else t.failures + 1 end) >= $2
                 and (t.locked_until is null or t.locked_until <= now())
                then now() + make_interval(mins => $3)
                else t.locked_until end
         returning failures, locked_until)
       select up.failures, up.locked_until,
              (up.locked_until is not null and up.locked_until > now()
               and up.locked_until is distinct from (select locked_until from prev)) as new_lock
         from up`,
      { bind: [key, policy.lockAfter, policy.lockMinutes, policy.resetAfterMinutes], type: QueryTypes.SELECT, transaction: t },
    );
    if (r?.new_lock && r.locked_until) {
      await auditIn(
        t,
        { id: null, label: 'system', address },
        {
          action: 'auth.locked',
          entity: 'login',
          entityId: key,
          after: { lockedUntil: new Date(r.locked_until).toISOString(), failures: r.failures },
        },
      );
    }
  });
}

/** Lift a lock (and forget the failures behind it). */
export async function unlockRecord(sequelize: Sequelize, actor: AuditActor, key: string): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const row = await LoginThrottle.findByPk(key, { transaction: t, lock: t.LOCK.UPDATE });
    if (!row)
      throw new DomainError('not-found', 'Not found', 'There is no lock or failure count for that key.', {
        errors: [{ path: 'key', message: 'Unknown key.' }],
      });
    await LoginThrottle.destroy({ where: { key }, transaction: t });
    await auditIn(t, actor, {
      action: 'auth.unlocked',
      entity: 'login',
      entityId: key,
      before: { failures: row.failures, lockedUntil: iso(row.lockedUntil) },
      after: { failures: 0, lockedUntil: null },
    });
  });
}
