/**
 * Sign-in hardening: no enumeration, malformed input, throttling that slows and then
 * locks (kept in PostgreSQL, visible to admins, lifted by an audited unlock), cookie
 * attributes, the cross-origin refusal, and sliding session expiry.
 *
 * Every throttling test uses a throwaway user created through the admin API, so the demo users
 * are never locked for other test files.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { closeTestPool, createThrowawayUser, freshSignIn, testPool, type Throwaway } from '../support/accounts.ts';
import { api, signIn } from '../support/http.ts';

const login = (username: string, password: string) => api('/api/auth/login', { method: 'POST', json: { username, password } });

/** Policy from src/lib/server/auth.ts THROTTLE (slow after 3 failures, 500 ms a step; lock after 8). */
const SLOW_AFTER = 3;
const STEP_MS = 500;
const LOCK_AFTER = 8;

let person: Throwaway;

beforeAll(async () => {
  person = await createThrowawayUser('operator', 'auth');
});

afterAll(async () => {
  // Every test here signs in from the same loopback address as the rest of the suite; forget
  // this file's address failures so that other files start from a clean count.
  await testPool().query(`delete from login_throttles where key like 'ip:%'`);
  await closeTestPool();
});

describe('POST /api/auth/login', () => {
  it('answers a wrong password and an unknown user with the same 401 and the same words', async () => {
    const wrong = await login(person.username, 'not-the-password');
    const unknown = await login(`nobody-${Date.now()}`, 'not-the-password');
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.headers.get('content-type')).toContain('application/problem+json');
    expect({ title: unknown.body.title, detail: unknown.body.detail }).toEqual({
      title: wrong.body.title,
      detail: wrong.body.detail,
    });
    expect(wrong.headers.get('set-cookie')).toBeNull();
    // and a right password clears the user's failure count
    expect((await login(person.username, person.password)).status).toBe(200);
    const { rows } = await testPool().query('select 1 from login_throttles where key = $1', [`user:${person.username}`]);
    expect(rows).toHaveLength(0);
  });

  it('answers a deactivated user with the same words as a wrong password', async () => {
    const gone = await createThrowawayUser('viewer', 'gone');
    const admin = await signIn('admin');
    expect(
      (await api(`/api/v1/admin/users/${gone.id}`, { method: 'PATCH', session: admin, json: { active: false } })).status,
    ).toBe(200);
    const r = await login(gone.username, gone.password);
    const wrong = await login(`nobody-${Date.now()}`, 'x');
    expect(r.status).toBe(401);
    expect(r.body.detail).toBe(wrong.body.detail);
  });

  it('refuses malformed JSON with 400 problem+json and a missing field with its path', async () => {
    const bad = await api('/api/auth/login', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: '{"username": "admin", ',
    });
    expect(bad.status).toBe(400);
    expect(bad.headers.get('content-type')).toContain('application/problem+json');
    const missing = await api('/api/auth/login', { method: 'POST', json: { username: 'admin' } });
    expect(missing.status).toBe(400);
    expect(missing.body.errors.map((e: { path: string }) => e.path)).toContain('password');
    const notJson = await api('/api/auth/login', {
      method: 'POST',
      headers: { 'content-type': 'application/xml' },
      body: '<username>admin</username>',
    });
    expect(notJson.status).toBe(415);
  });

  it('sets the session cookie HttpOnly, SameSite=Lax, Path=/ and without Secure over http', async () => {
    const s = await freshSignIn(person.username, person.password);
    const attrs = s.setCookie.split(';').map((a) => a.trim().toLowerCase());
    expect(attrs[0]).toMatch(/^coatrail_session=[a-z0-9]+$/);
    expect(attrs).toContain('httponly');
    expect(attrs).toContain('samesite=lax');
    expect(attrs).toContain('path=/');
    expect(attrs).not.toContain('secure');
  });
});

describe('throttling', () => {
  it('slows repeated failures, then locks; the lock holds for the right password, is in PostgreSQL, shown to admins and lifted by an audited unlock', async () => {
    const victim = await createThrowawayUser('operator', 'lock');
    const timings: number[] = [];
    for (let i = 0; i < LOCK_AFTER; i++) {
      const t0 = performance.now();
      const r = await login(victim.username, `wrong-${i}`);
      timings.push(performance.now() - t0);
      expect(r.status).toBe(401);
    }
    // Slowing: the attempt after k ≥ SLOW_AFTER failures waits at least (k − SLOW_AFTER + 1) steps
    // before it even checks the password (a lower bound on a deliberate delay, not a benchmark).
    for (let k = SLOW_AFTER; k < LOCK_AFTER; k++) {
      expect(timings[k]!, `attempt ${k + 1}`).toBeGreaterThanOrEqual((k - SLOW_AFTER + 1) * STEP_MS - 5);
    }
    // Locked: even the right password is refused, with 429 and plain words.
    const locked = await login(victim.username, victim.password);
    expect(locked.status).toBe(429);
    expect(locked.body.detail).toMatch(/locked/i);
    // Kept in PostgreSQL (survives a web-server restart): the row says so.
    const { rows } = await testPool().query<{ failures: number; locked_until: Date }>(
      'select failures, locked_until from login_throttles where key = $1',
      [`user:${victim.username}`],
    );
    expect(rows[0]!.failures).toBe(LOCK_AFTER);
    expect(new Date(rows[0]!.locked_until).getTime()).toBeGreaterThan(Date.now() + 10 * 60_000);
    // The lock is audited.
    const audited = await testPool().query(`select 1 from audit_log where action = 'auth.locked' and entity_id = $1`, [
      `user:${victim.username}`,
    ]);
    expect(audited.rows).toHaveLength(1);
    // Visible to admins (API and page), not to others.
    const admin = await signIn('admin');
    const locks = await api('/api/v1/admin/security/locks', { session: admin });
    expect(locks.status).toBe(200);
    const mine = locks.body.find((l: { key: string }) => l.key === `user:${victim.username}`);
    expect(mine).toMatchObject({ kind: 'user', subject: victim.username, locked: true, failures: LOCK_AFTER });
    const page = await fetch(`${inject('stack').baseUrl}/admin/security`, { headers: { cookie: admin.cookie } });
    expect(page.status).toBe(200);
    expect(await page.text()).toContain(victim.username);
    expect((await api('/api/v1/admin/security/locks', { session: await signIn('engineer') })).status).toBe(403);
    // Unlock: audited, and the right password works again.
    const un = await api('/api/v1/admin/security/unlock', {
      method: 'POST',
      session: admin,
      json: { key: `user:${victim.username}` },
    });
    expect(un.status).toBe(200);
    const trail = await testPool().query<{ actor_label: string; before: { failures: number } }>(
      `select actor_label, before from audit_log where action = 'auth.unlocked' and entity_id = $1`,
      [`user:${victim.username}`],
    );
    expect(trail.rows[0]).toMatchObject({ actor_label: 'admin', before: { failures: LOCK_AFTER } });
    expect((await login(victim.username, victim.password)).status).toBe(200);
  }, 60_000);

  it('counts unknown usernames the same way, so a lock does not reveal whether an account exists', async () => {
    const ghost = `ghost-${Date.now()}`;
    await testPool().query(`insert into login_throttles (key, failures, last_failure_at) values ($1, $2, now())`, [
      `user:${ghost}`,
      LOCK_AFTER - 1,
    ]);
    expect((await login(ghost, 'x')).status).toBe(401);
    expect((await login(ghost, 'x')).status).toBe(429);
  }, 30_000);
});

describe('cross-site requests', () => {
  it('refuses a state-changing request with a session cookie from another origin, and accepts our own', async () => {
    const admin = await signIn('admin');
    const body = { name: `xsite-${Date.now()}`, role: 'viewer' };
    const evil = await api('/api/v1/admin/tokens', {
      method: 'POST',
      session: admin,
      json: body,
      headers: { origin: 'https://evil.example' },
    });
    expect(evil.status).toBe(403);
    expect(evil.headers.get('content-type')).toContain('application/problem+json');
    const { rows } = await testPool().query('select 1 from api_tokens where name = $1', [body.name]);
    expect(rows).toHaveLength(0);
    const site = await api('/api/v1/admin/tokens', {
      method: 'POST',
      session: admin,
      json: body,
      headers: { 'sec-fetch-site': 'cross-site' },
    });
    expect(site.status).toBe(403);
    const own = await api('/api/v1/admin/tokens', {
      method: 'POST',
      session: admin,
      json: body,
      headers: { origin: inject('stack').baseUrl },
    });
    expect(own.status).toBe(201);
  });
});

describe('sliding expiry', () => {
  it('moves expires_at forward when a session is used in its second half, not in its first', async () => {
    const s = await freshSignIn(person.username, person.password);
    const id = s.cookie.split('=')[1]!;
    // the table holds the SHA-256 of the id, never the id
    const key = createHash('sha256').update(id).digest('hex');
    const exp = async () =>
      new Date(
        (await testPool().query<{ e: Date }>('select expires_at as e from user_sessions where id = $1', [key])).rows[0]!.e,
      ).getTime();
    const fresh = await exp();
    // First half: no change.
    const r1 = await api('/api/v1/channels', { session: s });
    expect(r1.status).toBe(200);
    expect(await exp()).toBe(fresh);
    // Second half (1 h left of 12 h): the next request extends it to a full 12 h and re-sends the cookie.
    await testPool().query(`update user_sessions set expires_at = now() + interval '1 hour' where id = $1`, [key]);
    const before = await exp();
    const r2 = await api('/api/v1/channels', { session: s });
    expect(r2.status).toBe(200);
    const after = await exp();
    expect(after - before).toBeGreaterThan(10 * 3600_000);
    expect(r2.headers.get('set-cookie') ?? '').toContain(`coatrail_session=${id}`);
    // An expired session is not accepted.
    await testPool().query(`update user_sessions set expires_at = now() - interval '1 second' where id = $1`, [key]);
    expect((await api('/api/v1/channels', { session: s })).status).toBe(401);
  });
});
