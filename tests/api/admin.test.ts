/**
 * Admin API: users (create with role and e-mail, role change, deactivate/reactivate,
 * never delete, guards against locking the admins out), API tokens (shown once, stored hashed,
 * Bearer use with last-use recorded, revoke → 401), caught mail — each change audited with
 * before → after.
 */
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import {
  closeTestPool,
  createThrowawayUser,
  freshSignIn,
  lastMailId,
  resetTokenIn,
  testPool,
  waitForMail,
} from '../support/accounts.ts';
import { api, signIn } from '../support/http.ts';

afterAll(async () => {
  await closeTestPool();
});

const auditOf = async (entity: string, id: number | string) =>
  (
    await testPool().query<{ action: string; actor_label: string; before: any; after: any; address: string | null }>(
      'select action, actor_label, before, after, address from audit_log where entity = $1 and entity_id = $2 order by id',
      [entity, String(id)],
    )
  ).rows;

describe('users', () => {
  it('creates a user with role and e-mail, audited without the password hash', async () => {
    const u = await createThrowawayUser('engineer', 'adm');
    const list = await api('/api/v1/admin/users', { session: await signIn('admin') });
    expect(list.status).toBe(200);
    expect(list.body.find((x: { id: number }) => x.id === u.id)).toMatchObject({
      username: u.username,
      email: u.email,
      role: 'engineer',
      active: true,
    });
    expect(JSON.stringify(list.body)).not.toMatch(/argon2|passwordHash/);
    const trail = await auditOf('user', u.id);
    expect(trail[0]).toMatchObject({
      action: 'user.created',
      actor_label: 'admin',
      before: null,
      after: { username: u.username, role: 'engineer', active: true },
    });
    expect(trail[0]!.address).toBeTruthy();
    expect(JSON.stringify(trail[0])).not.toMatch(/argon2/);
    expect((await freshSignIn(u.username, u.password)).role).toBe('engineer');
  });

  it('without an initial password, e-mails a link to set one', async () => {
    const admin = await signIn('admin');
    const username = `inv-${Date.now().toString(36)}`;
    const email = `${username}@example.test`;
    const since = await lastMailId();
    const r = await api('/api/v1/admin/users', {
      method: 'POST',
      session: admin,
      json: { username, displayName: 'Invited Person', email, role: 'viewer' },
    });
    expect(r.status).toBe(201);
    expect(r.body.invited).toBe(true);
    const mail = await waitForMail(email, since);
    expect(mail.subject).toBe('Your Coatrail account');
    const token = resetTokenIn(mail.body);
    expect(
      (await api('/api/auth/reset-password', { method: 'POST', json: { token, password: 'invited-password-1' } })).status,
    ).toBe(200);
    expect((await freshSignIn(username, 'invited-password-1')).role).toBe('viewer');
  });

  it('refuses bad input with field paths and a taken username with 409', async () => {
    const admin = await signIn('admin');
    const bad = await api('/api/v1/admin/users', {
      method: 'POST',
      session: admin,
      json: { username: 'A B', displayName: '', email: 'not-mail', role: 'boss', password: 'short' },
    });
    expect(bad.status).toBe(400);
    expect(bad.body.errors.map((e: { path: string }) => e.path).sort()).toEqual([
      'displayName',
      'email',
      'password',
      'role',
      'username',
    ]);
    const taken = await api('/api/v1/admin/users', {
      method: 'POST',
      session: admin,
      json: { username: 'operator', displayName: 'Other', email: 'o@example.test', role: 'viewer', password: 'long-enough-pw' },
    });
    expect(taken.status).toBe(409);
    expect(taken.body.errors[0].path).toBe('username');
    const malformed = await api('/api/v1/admin/users', {
      method: 'POST',
      session: admin,
      headers: { 'content-type': 'application/json' },
      body: '{"username":',
    });
    expect(malformed.status).toBe(400);
  });

  it('changes a role (effective on the next request, audited before → after)', async () => {
    const u = await createThrowawayUser('viewer', 'role');
    const s = await freshSignIn(u.username, u.password);
    expect((await api('/api/v1/channels', { method: 'POST', session: s, json: {} })).status).toBe(403);
    const r = await api(`/api/v1/admin/users/${u.id}`, {
      method: 'PATCH',
      session: await signIn('admin'),
      json: { role: 'engineer' },
    });
    expect(r.status).toBe(200);
    expect(r.body.role).toBe('engineer');
    // Same session, new role: now validation (400), not the role (403), answers.
    expect((await api('/api/v1/channels', { method: 'POST', session: s, json: {} })).status).toBe(400);
    const trail = await auditOf('user', u.id);
    expect(trail.at(-1)).toMatchObject({ action: 'user.role-changed', before: { role: 'viewer' }, after: { role: 'engineer' } });
  });

  it('deactivates (ending every session, refusing sign-in) and reactivates; never deletes', async () => {
    const u = await createThrowawayUser('operator', 'deact');
    const s1 = await freshSignIn(u.username, u.password);
    const s2 = await freshSignIn(u.username, u.password);
    const admin = await signIn('admin');
    const off = await api(`/api/v1/admin/users/${u.id}`, { method: 'PATCH', session: admin, json: { active: false } });
    expect(off.status).toBe(200);
    expect(off.body).toMatchObject({ active: false, sessions: 0 });
    const { rows } = await testPool().query('select 1 from user_sessions where user_id = $1', [u.id]);
    expect(rows).toHaveLength(0);
    expect((await api('/api/v1/channels', { session: s1 })).status).toBe(401);
    expect((await api('/api/v1/channels', { session: s2 })).status).toBe(401);
    expect((await api('/api/auth/login', { method: 'POST', json: { username: u.username, password: u.password } })).status).toBe(
      401,
    );
    const on = await api(`/api/v1/admin/users/${u.id}`, { method: 'PATCH', session: admin, json: { active: true } });
    expect(on.body.active).toBe(true);
    expect((await freshSignIn(u.username, u.password)).role).toBe('operator');
    const trail = await auditOf('user', u.id);
    const changes = trail.filter((t) => t.action.startsWith('user.'));
    // (the throwaway user replaced the admin-chosen password at its first sign-in)
    expect(changes.map((t) => t.action)).toEqual([
      'user.created',
      'user.password-changed',
      'user.deactivated',
      'user.reactivated',
    ]);
    expect(changes[2]).toMatchObject({ before: { active: true }, after: { active: false } });
    // There is no way to delete a user.
    expect((await api(`/api/v1/admin/users/${u.id}`, { method: 'DELETE', session: admin })).status).toBeGreaterThanOrEqual(400);
    expect((await testPool().query('select 1 from users where id = $1', [u.id])).rows).toHaveLength(1);
  });

  it('keeps an admin from demoting or deactivating themself, and keeps one active admin', async () => {
    const admin = await signIn('admin');
    const me = (await api('/api/v1/admin/users', { session: admin })).body.find(
      (u: { username: string }) => u.username === 'admin',
    );
    const demote = await api(`/api/v1/admin/users/${me.id}`, { method: 'PATCH', session: admin, json: { role: 'viewer' } });
    expect(demote.status).toBe(409);
    const off = await api(`/api/v1/admin/users/${me.id}`, { method: 'PATCH', session: admin, json: { active: false } });
    expect(off.status).toBe(409);
    expect((await api(`/api/v1/admin/users/${me.id}`, { method: 'PATCH', session: admin, json: {} })).status).toBe(400);
    expect(
      (await api('/api/v1/admin/users/2147483000', { method: 'PATCH', session: admin, json: { role: 'viewer' } })).status,
    ).toBe(404);
  });
});

describe('API tokens', () => {
  it('shows the secret once, stores only its hash, works as Bearer with its role, records last use, and 401s once revoked', async () => {
    const admin = await signIn('admin');
    const name = `lims-${Date.now()}`;
    const created = await api('/api/v1/admin/tokens', { method: 'POST', session: admin, json: { name, role: 'quality' } });
    expect(created.status).toBe(201);
    const { secret, id, prefix } = created.body;
    expect(secret).toMatch(/^ct_[A-Za-z0-9_-]{32}$/);
    expect(prefix).toBe(secret.slice(0, 8));
    const { rows } = await testPool().query<{ token_hash: string; last_used_at: Date | null }>(
      'select token_hash, last_used_at from api_tokens where id = $1',
      [id],
    );
    expect(rows[0]!.token_hash).toBe(createHash('sha256').update(secret).digest('hex'));
    expect(rows[0]!.last_used_at).toBeNull();
    // The list never shows secrets.
    const list = await api('/api/v1/admin/tokens', { session: admin });
    expect(list.body.find((t: { id: number }) => t.id === id)).toMatchObject({
      name,
      role: 'quality',
      prefix,
      revokedAt: null,
      lastUsedAt: null,
      createdBy: 'admin',
    });
    expect(JSON.stringify(list.body)).not.toContain(secret);
    // Use: quality may read the audit trail but not create channels.
    const bearer = { authorization: `Bearer ${secret}` };
    expect((await api('/api/v1/audit?pageSize=1', { headers: bearer })).status).toBe(200);
    expect((await api('/api/v1/channels', { method: 'POST', headers: bearer, json: {} })).status).toBe(403);
    const used = await testPool().query<{ last_used_at: Date | null }>('select last_used_at from api_tokens where id = $1', [id]);
    expect(used.rows[0]!.last_used_at).not.toBeNull();
    // Revoke → 401, and revoking twice is a 409.
    const rev = await api(`/api/v1/admin/tokens/${id}/revoke`, { method: 'POST', session: admin, json: {} });
    expect(rev.status).toBe(200);
    expect(rev.body.revokedAt).not.toBeNull();
    const after = await api('/api/v1/audit?pageSize=1', { headers: bearer });
    expect(after.status).toBe(401);
    expect(after.headers.get('content-type')).toContain('application/problem+json');
    expect((await api(`/api/v1/admin/tokens/${id}/revoke`, { method: 'POST', session: admin, json: {} })).status).toBe(409);
    const trail = await auditOf('api-token', id);
    expect(trail.map((t) => t.action)).toEqual(['token.created', 'token.revoked']);
    expect(trail[1]).toMatchObject({ before: { revokedAt: null } });
    expect(JSON.stringify(trail)).not.toContain(secret);
  });

  it('audits what a token changes under the token’s name', async () => {
    const admin = await signIn('admin');
    const t = (
      await api('/api/v1/admin/tokens', {
        method: 'POST',
        session: admin,
        json: { name: `provisioner-${Date.now()}`, role: 'engineer' },
      })
    ).body;
    const r = await api('/api/v1/materials', {
      method: 'POST',
      headers: { authorization: `Bearer ${t.secret}` },
      json: { code: `tok-${Date.now().toString(36)}`, name: 'Token-made substrate', refractiveIndex: 1.5 },
    });
    expect(r.status).toBe(201);
    const trail = await auditOf('material', r.body.id);
    expect(trail[0]!.actor_label).toBe(`token:${t.name}`);
  });

  it('refuses a malformed Authorization header and an unknown token with 401', async () => {
    expect((await api('/api/v1/channels', { headers: { authorization: 'Basic abc' } })).status).toBe(401);
    expect((await api('/api/v1/channels', { headers: { authorization: 'Bearer ct_not-a-real-token' } })).status).toBe(401);
  });
});

describe('caught e-mail', () => {
  it('is listed for admins only', async () => {
    expect((await api('/api/v1/admin/mail', { session: await signIn('admin') })).status).toBe(200);
    expect((await api('/api/v1/admin/mail', { session: await signIn('quality') })).status).toBe(403);
  });
});
