/**
 * Helpers for tests that need their own people: a throwaway user created through the admin
 * API (so the demo users are never locked or changed for other tests), the test database,
 * and the mail the local fake SMTP relay caught.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { inject } from 'vitest';
import { api, signIn, type Session } from './http.ts';

let pool: pg.Pool | null = null;

/** A small pool on the test database (closed by `closeTestPool()` in afterAll). */
export function testPool(): pg.Pool {
  pool ??= new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  return pool;
}

export async function closeTestPool(): Promise<void> {
  await pool?.end();
  pool = null;
}

export interface Throwaway {
  id: number;
  username: string;
  email: string;
  password: string;
  role: string;
}

/** A unique user with a known password, created by the demo admin through the admin API. */
export async function createThrowawayUser(role = 'operator', prefix = 't'): Promise<Throwaway> {
  const admin = await signIn('admin');
  const tag = randomBytes(4).toString('hex');
  const username = `${prefix}-${tag}`.slice(0, 40);
  const email = `${username}@example.test`;
  const password = `pw-${randomBytes(8).toString('hex')}`;
  const r = await api('/api/v1/admin/users', {
    method: 'POST',
    session: admin,
    json: { username, displayName: `Test ${tag}`, email, role, password },
  });
  if (r.status !== 201) throw new Error(`creating ${username} failed: ${r.status} ${JSON.stringify(r.body)}`);
  // The admin chose that password, so the account must set its own first (as at a first sign-in).
  const own = await setOwnPassword(username, password);
  return { id: r.body.user.id, username, email, password: own, role };
}

/** Sign in with an admin-chosen password and replace it (clears must-change-password); returns the new one. */
export async function setOwnPassword(username: string, current: string): Promise<string> {
  const s = await freshSignIn(username, current);
  const next = `own-${randomBytes(8).toString('hex')}`;
  const r = await api('/api/auth/change-password', {
    method: 'POST',
    session: s,
    json: { currentPassword: current, newPassword: next },
  });
  if (r.status !== 204) throw new Error(`changing ${username}'s password failed: ${r.status} ${JSON.stringify(r.body)}`);
  return next;
}

/** Sign in without the cache of support/http.ts (a fresh session each time). */
export async function freshSignIn(username: string, password: string): Promise<Session & { setCookie: string }> {
  const r = await fetch(`${inject('stack').baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ username, password }),
  });
  if (r.status !== 200) throw new Error(`sign-in as ${username} failed: ${r.status} ${await r.text()}`);
  const setCookie = r.headers.get('set-cookie') ?? '';
  return { cookie: setCookie.split(';')[0]!, role: ((await r.json()) as { user: { role: string } }).user.role, setCookie };
}

export interface CaughtMail {
  id: number;
  mail_to: string;
  subject: string | null;
  body: string;
}

/** Wait for a message to `to` newer than `afterId` in outbox_mail (the fake relay's store). */
export async function waitForMail(to: string, afterId = 0, timeoutMs = 10_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const { rows } = await testPool().query<CaughtMail>(
      'select id, mail_to, subject, body from outbox_mail where mail_to = $1 and id > $2 order by id desc limit 1',
      [to, afterId],
    );
    if (rows[0]) return rows[0];
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to} arrived within ${timeoutMs} ms`);
}

export async function lastMailId(): Promise<number> {
  const { rows } = await testPool().query<{ id: number | null }>('select max(id) as id from outbox_mail');
  return rows[0]?.id ?? 0;
}

/** The reset link's token in a caught message. */
export function resetTokenIn(body: string): string {
  const m = /\/reset-password\?token=([A-Za-z0-9_%-]+)/.exec(body);
  if (!m?.[1]) throw new Error(`no reset link in: ${body}`);
  return decodeURIComponent(m[1]);
}
