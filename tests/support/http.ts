/** Small HTTP helpers for API tests against the running test stack. */
import { inject } from 'vitest';
import { TEST_PASSWORD } from './test-stack.ts';

export const base = () => inject('stack').baseUrl;

export interface Session {
  cookie: string;
  role: string;
}

const cache = new Map<string, Session>();

/** Sign in as a demo user (cached per test file). */
export async function signIn(username: string, password = TEST_PASSWORD): Promise<Session> {
  const hit = cache.get(username);
  if (hit && password === TEST_PASSWORD) return hit;
  const r = await fetch(`${base()}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ username, password }),
  });
  if (r.status !== 200) throw new Error(`sign-in as ${username} failed: ${r.status} ${await r.text()}`);
  const cookie = (r.headers.get('set-cookie') ?? '').split(';')[0]!;
  const s = { cookie, role: ((await r.json()) as { user: { role: string } }).user.role };
  if (password === TEST_PASSWORD) cache.set(username, s);
  return s;
}

export async function api(
  path: string,
  init: RequestInit & { session?: Session | null; json?: unknown } = {},
): Promise<{ status: number; body: any; headers: Headers }> {
  const headers = new Headers(init.headers);
  if (init.session) headers.set('cookie', init.session.cookie);
  let body = init.body;
  if (init.json !== undefined) {
    headers.set('content-type', 'application/json');
    body = JSON.stringify(init.json);
  }
  const r = await fetch(`${base()}${path}`, { ...init, headers, body: body ?? null, redirect: 'manual' });
  const text = await r.text();
  let parsed: unknown = text;
  try {
    parsed = text ? JSON.parse(text) : null;
  } catch {
    /* not JSON */
  }
  return { status: r.status, body: parsed, headers: r.headers };
}
