/**
 * The role matrix: walks every API route in src/pages/api, reads the verbs it exports and
 * checks each one against the permission table (src/lib/shared/roles.ts):
 *   - anonymous → 401 problem+json (unless the route is public);
 *   - each demo role → 403 problem+json when `can(role, action)` is false, otherwise neither 401 nor 403;
 *   - an API token carrying a role answers exactly as that role's session does;
 *   - a revoked token → 401 everywhere that is not public.
 * A route that is not listed in ROUTES fails with "add it", so a route added without a guard
 * (or without thinking about who may call it) cannot slip through.
 *
 * To add a route: one line `'METHOD /api/path/[param]': '<action>' | 'public'` below.
 */
import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { can, ROLES, type Action, type Role } from '../../src/lib/shared/roles.ts';
import { base, signIn, type Session } from '../support/http.ts';
import { root } from '../support/test-stack.ts';

const ROUTES: Record<string, Action | 'public'> = {
  // process windows, bath log, calculators, API document (issue 8)
  'GET /api/openapi.json': 'public',
  'GET /api/v1/windows': 'view',
  'POST /api/v1/windows': 'window.edit',
  'GET /api/v1/windows/[id]': 'view',
  'PATCH /api/v1/windows/[id]': 'window.edit',
  'POST /api/v1/windows/[id]/approve': 'window.approve',
  'GET /api/v1/windows/assignments': 'view',
  'POST /api/v1/windows/assignments': 'window.edit',
  'GET /api/v1/windows/in-force': 'view',
  'GET /api/v1/materials': 'view',
  'POST /api/v1/materials': 'window.edit',
  'GET /api/v1/lacquers': 'view',
  'POST /api/v1/lacquers': 'window.edit',
  'GET /api/v1/lots': 'view',
  'POST /api/v1/lots': 'bath.configure',
  'GET /api/v1/baths': 'view',
  'GET /api/v1/baths/checks': 'view',
  'POST /api/v1/baths/checks': 'bath.log',
  'GET /api/v1/baths/additions': 'view',
  'POST /api/v1/baths/additions': 'bath.log',
  'GET /api/v1/baths/filter-changes': 'view',
  'POST /api/v1/baths/filter-changes': 'bath.log',
  'GET /api/v1/baths/charges': 'view',
  'POST /api/v1/baths/charges': 'bath.configure',
  'POST /api/v1/calc/dip-thickness': 'calc.use',
  'POST /api/v1/calc/viscosity-cup': 'calc.use',
  'POST /api/v1/calc/cure-equivalent': 'calc.use',
  'POST /api/v1/calc/fringe-thickness': 'calc.use',
  'POST /api/v1/calc/fringe-thickness/spectrum': 'calc.use',
  'POST /api/v1/calc/crosscut': 'calc.use',
  'POST /api/v1/calc/uniformity': 'calc.use',
  'POST /api/v1/calc/speed-advisor': 'calc.use',
  'POST /api/v1/calc/calibration': 'calc.use',
  'POST /api/v1/calc/bath-addition': 'calc.use',
  'POST /api/v1/calc/activation-energy': 'calc.use',
  'POST /api/v1/calc/abrasion': 'calc.use',
  'POST /api/auth/login': 'public',
  'POST /api/auth/logout': 'public',
  'GET /api/health': 'public',
  'GET /api/v1/stream': 'view',
  'GET /api/v1/alarms': 'view',
  'POST /api/v1/alarms/ack': 'alarm.ack',
  'GET /api/v1/alarms/kpi': 'alarm.health',
  'GET /api/v1/alarms/[id]': 'view',
  'POST /api/v1/alarms/[id]/ack': 'alarm.ack',
  'POST /api/v1/alarms/[id]/shelve': 'alarm.shelve',
  'POST /api/v1/alarms/[id]/unshelve': 'alarm.shelve',
  'POST /api/v1/alarms/[id]/out-of-service': 'alarm.configure',
  'POST /api/v1/alarms/[id]/return-to-service': 'alarm.configure',
  'GET /api/v1/alarm-configs': 'alarm.configure',
  'PUT /api/v1/alarm-configs/[channelId]': 'alarm.configure',
  'DELETE /api/v1/alarm-configs/[channelId]': 'alarm.configure',
  'GET /api/v1/alarm-configs/escalation': 'alarm.configure',
  'PUT /api/v1/alarm-configs/escalation': 'alarm.configure',
  'GET /api/v1/alarm-configs/characteristics': 'alarm.configure',
  'PUT /api/v1/alarm-configs/characteristics/[characteristicId]': 'alarm.configure',
  // accounts, admin, audit (issue 3)
  'POST /api/auth/forgot-password': 'public',
  'POST /api/auth/reset-password': 'public',
  'GET /api/v1/admin/users': 'admin.users',
  'POST /api/v1/admin/users': 'admin.users',
  'PATCH /api/v1/admin/users/[id]': 'admin.users',
  'POST /api/v1/admin/users/[id]/password-reset': 'admin.users',
  'GET /api/v1/admin/tokens': 'admin.tokens',
  'POST /api/v1/admin/tokens': 'admin.tokens',
  'POST /api/v1/admin/tokens/[id]/revoke': 'admin.tokens',
  'GET /api/v1/admin/security/locks': 'admin.security',
  'POST /api/v1/admin/security/unlock': 'admin.security',
  'GET /api/v1/admin/mail': 'admin.mail',
  'GET /api/v1/audit': 'audit.view',
  // plant set-up (issue 4 part 1)
  'GET /api/v1/assets': 'view',
  'GET /api/v1/channels': 'view',
  'POST /api/v1/channels': 'plant.configure',
  'GET /api/v1/devices': 'plant.view',
  'POST /api/v1/devices': 'admin.devices',
  'PATCH /api/v1/devices/[id]': 'admin.devices',
  'POST /api/v1/devices/[id]/rotate-password': 'admin.devices',
  'POST /api/v1/ingest/unknown-channels/[id]/approve': 'plant.configure',
  // telemetry pipeline (issue 4 part 2)
  'GET /api/v1/channels/[id]/readings': 'view',
  'GET /api/v1/channels/[id]/annotations': 'view',
  'GET /api/v1/floor': 'view',
  'GET /api/v1/ingest/rejections': 'ingest.review',
  'GET /api/v1/ingest/unknown-channels': 'ingest.review',
  // SPC: evaluation, characteristics, control-limit studies (issue 5)
  'POST /api/v1/spc/evaluate': 'spc.evaluate',
  'GET /api/v1/characteristics': 'view',
  'POST /api/v1/characteristics': 'characteristic.edit',
  'GET /api/v1/characteristics/[id]': 'view',
  'PUT /api/v1/characteristics/[id]': 'characteristic.edit',
  'GET /api/v1/characteristics/[id]/points': 'view',
  'GET /api/v1/characteristics/[id]/points/[pointId]': 'view',
  'POST /api/v1/characteristics/[id]/study': 'limits.study',
  'GET /api/v1/characteristics/[id]/limit-sets': 'view',
  'POST /api/v1/characteristics/[id]/limit-sets': 'limits.study',
  'GET /api/v1/characteristics/[id]/limit-sets/[setId]': 'view',
  'DELETE /api/v1/characteristics/[id]/limit-sets/[setId]': 'limits.study',
  'POST /api/v1/characteristics/[id]/limit-sets/[setId]/approve': 'limits.approve',
  // loads, dip runs, quality, trace, holds, nonconformances, surveys (issue 9)
  'GET /api/v1/loads': 'view',
  'POST /api/v1/loads': 'load.manage',
  'GET /api/v1/loads/[id]': 'view',
  'POST /api/v1/loads/[id]/close': 'load.manage',
  'POST /api/v1/loads/[id]/jobs': 'load.manage',
  'POST /api/v1/loads/[id]/recompute': 'load.recompute',
  'GET /api/v1/dip-runs': 'view',
  'POST /api/v1/dip-runs': 'dip.record',
  'GET /api/v1/dip-runs/[id]': 'view',
  'GET /api/v1/jobs': 'view',
  'POST /api/v1/jobs/import/preview': 'dip.record',
  'POST /api/v1/jobs/import/commit': 'dip.record',
  'GET /api/v1/quality/tests': 'view',
  'POST /api/v1/quality/tests': 'quality.record',
  'GET /api/v1/quality/tests/[id]': 'view',
  'POST /api/v1/quality/tests/[id]/files': 'quality.record',
  'GET /api/v1/quality/files/[id]': 'view',
  'GET /api/v1/quality/acceptance': 'view',
  'PUT /api/v1/quality/acceptance': 'quality.settings',
  'GET /api/v1/quality/adhesion': 'view',
  'GET /api/v1/trace/jobs/[jobNumber]': 'view',
  'GET /api/v1/holds': 'view',
  'POST /api/v1/holds': 'hold.place',
  'POST /api/v1/holds/close': 'hold.release',
  'GET /api/v1/nonconformances': 'view',
  'POST /api/v1/nonconformances': 'nc.write',
  'GET /api/v1/nonconformances/[id]': 'view',
  'POST /api/v1/nonconformances/[id]/dispositions': 'hold.release',
  'POST /api/v1/nonconformances/[id]/close': 'nc.write',
  'GET /api/v1/surveys': 'view',
  'POST /api/v1/surveys': 'survey.record',
  'POST /api/v1/surveys/preview': 'survey.record',
  'GET /api/v1/surveys/[id]': 'view',
  'GET /api/v1/surveys/settings': 'view',
  'PUT /api/v1/surveys/settings': 'plant.configure',
  // AR coating calculators
  'POST /api/v1/calc/stack-reflectance': 'calc.use',
  'POST /api/v1/calc/spectrum-colour': 'calc.use',
  'POST /api/v1/calc/colour-difference': 'calc.use',
  'POST /api/v1/calc/cure-verdict': 'calc.use',
  'POST /api/auth/change-password': 'view',
  // measurement-system analysis
  'GET /api/v1/gauges': 'view',
  'POST /api/v1/gauges': 'msa.record',
  'GET /api/v1/gauges/studies': 'view',
  'POST /api/v1/gauges/studies': 'msa.record',
  'GET /api/v1/gauges/studies/[id]': 'view',
  'GET /api/v1/characteristics/[id]/gauge': 'view',
  'PUT /api/v1/characteristics/[id]/gauge': 'characteristic.edit',
  'POST /api/v1/calc/gauge-rr': 'calc.use',
  'POST /api/v1/calc/gauge-bias': 'calc.use',
  'POST /api/v1/calc/gauge-linearity': 'calc.use',
  'POST /api/v1/calc/dew-point': 'calc.use',
  // tamper-evident audit trail
  'GET /api/v1/admin/audit-chain': 'admin.security',
  'POST /api/v1/admin/audit-chain': 'admin.security',
};

/**
 * Actions an API token may never perform whatever its role (people, tokens and device
 * credentials need a signed-in person), written out here rather than read from the guard.
 */
const SESSION_ONLY: ReadonlySet<string> = new Set(['admin.users', 'admin.tokens', 'admin.devices']);

/**
 * A plausible value for each dynamic segment. Numeric ids are well-formed but absent
 * (ABSENT_ID), so an allowed role gets a 404 instead of acting on a real record: the matrix
 * must not revoke a token, rotate a device password or acknowledge an alarm of the demo plant.
 */
const ABSENT_ID = '2147483000';
const SAMPLE_PARAMS: Record<string, string> = {
  jobNumber: 'X-1',
  number: 'X-1',
  key: 'x-1',
  slug: 'x-1',
  name: 'x-1',
};

interface FoundRoute {
  method: string;
  /** As written in ROUTES, e.g. /api/v1/alarms/[id]/ack */
  pattern: string;
  /** A concrete URL to call, e.g. /api/v1/alarms/1/ack */
  url: string;
}

function walk(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = path.join(dir, d.name);
    return d.isDirectory() ? walk(p) : /\.(ts|js|mjs)$/.test(d.name) ? [p] : [];
  });
}

function findRoutes(): FoundRoute[] {
  const apiDir = path.join(root, 'src/pages/api');
  const out: FoundRoute[] = [];
  for (const file of walk(apiDir).sort()) {
    const rel = path.relative(path.join(root, 'src/pages'), file).replace(/\\/g, '/');
    const pattern = '/' + rel.replace(/\.(ts|js|mjs)$/, '').replace(/\/index$/, '');
    const url = pattern.replace(/\[(\.\.\.)?([^\]]+)\]/g, (_, _rest, name: string) => SAMPLE_PARAMS[name] ?? ABSENT_ID);
    const src = fs.readFileSync(file, 'utf8');
    const verbs = new Set([...src.matchAll(/export\s+const\s+(GET|POST|PUT|PATCH|DELETE)\b/g)].map((m) => m[1]!));
    for (const method of verbs) out.push({ method, pattern, url });
  }
  return out;
}

const found = findRoutes();

/** One request; the body is abandoned once the status is known (so event streams do not hang). */
async function call(
  route: FoundRoute,
  auth: { cookie?: string; bearer?: string } = {},
): Promise<{ status: number; type: string }> {
  const headers = new Headers();
  if (auth.cookie) headers.set('cookie', auth.cookie);
  if (auth.bearer) headers.set('authorization', `Bearer ${auth.bearer}`);
  const write = route.method !== 'GET';
  if (write) headers.set('content-type', 'application/json');
  const ac = new AbortController();
  const r = await fetch(`${base()}${route.url}`, {
    method: route.method,
    headers,
    body: write ? '{}' : null,
    redirect: 'manual',
    signal: ac.signal,
  });
  const type = r.headers.get('content-type') ?? '';
  ac.abort();
  return { status: r.status, type };
}

const sessions = new Map<Role, Session>();
const tokens = new Map<Role, string>();
let revokedToken = '';
let pool: pg.Pool;

/** Tokens are issued through the database here so this test depends on nothing but the middleware. */
async function issueToken(role: Role, revoked: boolean): Promise<string> {
  const secret = 'ct_' + randomBytes(24).toString('base64url');
  const hash = createHash('sha256').update(secret).digest('hex');
  await pool.query(
    `insert into api_tokens (name, role, token_hash, prefix, created_by, revoked_at)
     values ($1, $2, $3, $4, (select id from users where username = 'admin'), $5)`,
    [`role-matrix-${role}-${randomBytes(4).toString('hex')}`, role, hash, secret.slice(0, 8), revoked ? new Date() : null],
  );
  return secret;
}

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  for (const role of ROLES) {
    sessions.set(role, await signIn(role));
    tokens.set(role, await issueToken(role, false));
  }
  revokedToken = await issueToken('admin', true);
});

afterAll(async () => {
  await pool?.end();
});

describe('role matrix over every API route', () => {
  it('finds the API routes', () => {
    expect(found.map((r) => `${r.method} ${r.pattern}`)).toContain('POST /api/auth/login');
  });

  it('lists no route that no longer exists', () => {
    const keys = new Set(found.map((r) => `${r.method} ${r.pattern}`));
    const stale = Object.keys(ROUTES).filter((k) => !keys.has(k));
    expect(stale, 'these ROUTES entries name no exported verb; remove or fix them').toEqual([]);
  });

  describe.each(found.map((r) => [`${r.method} ${r.pattern}`, r] as const))('%s', (key, route) => {
    const action = ROUTES[key];

    it('is in the ROUTES table', () => {
      expect(
        action,
        `${key} is not in ROUTES of tests/api/role-matrix.test.ts — add it with its action or 'public'`,
      ).toBeDefined();
    });

    if (action === undefined) return;

    if (action === 'public') {
      it('answers anonymous callers without 401/403', async () => {
        const r = await call(route);
        expect([401, 403]).not.toContain(r.status);
      });
      return;
    }

    it('answers anonymous callers 401 problem+json', async () => {
      const r = await call(route);
      expect(r.status).toBe(401);
      expect(r.type).toContain('application/problem+json');
    });

    it('answers a revoked API token 401', async () => {
      const r = await call(route, { bearer: revokedToken });
      expect(r.status).toBe(401);
      expect(r.type).toContain('application/problem+json');
    });

    it.each(ROLES.map((role) => [role] as const))(`as %s: 403 unless can(role, '${action}')`, async (role) => {
      const viaSession = await call(route, { cookie: sessions.get(role)!.cookie });
      const viaToken = await call(route, { bearer: tokens.get(role)! });
      for (const [how, r] of [
        ['session', viaSession],
        ['token', viaToken],
      ] as const) {
        if (how === 'token' && SESSION_ONLY.has(action)) {
          expect(r.status, `a ${role} token may not ${action}`).toBe(403);
          expect(r.type).toContain('application/problem+json');
        } else if (can(role, action)) {
          expect([401, 403], `${role} (${how}) may ${action} but got ${r.status}`).not.toContain(r.status);
        } else {
          expect(r.status, `${role} (${how}) may not ${action}`).toBe(403);
          expect(r.type).toContain('application/problem+json');
        }
      }
    });
  });
});
