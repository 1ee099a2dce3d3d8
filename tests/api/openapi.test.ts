/**
 * The OpenAPI document (product.md §6: "The API is described in an OpenAPI document served by
 * the app"), checked three ways:
 *   1. it is a valid OpenAPI 3.1 document (@seriousme/openapi-schema-validator, the JSON Schema
 *      of the OpenAPI Initiative), and every verb of every route file under src/pages/api is in
 *      it, and nothing else;
 *   2. each route file guards and validates with its own `contract` (the objects the document is
 *      generated from), never with a schema or permission of its own;
 *   3. each operation behaves as documented: anonymous callers get 401, roles outside the
 *      documented ones 403 and the documented ones neither; a bad body or query gets the
 *      documented 400 (a non-JSON body 415); every GET answers with a body that validates
 *      against the documented response schema (real records of the demo plant for path ids).
 * To document a route: see DEVELOPERS.md, "How to add… an API route".
 */
import { Validator } from '@seriousme/openapi-schema-validator';
import Ajv2020 from 'ajv/dist/2020.js';
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '../../src/lib/shared/roles.ts';
import { api, base, signIn, type Session } from '../support/http.ts';
import { root } from '../support/test-stack.ts';

type Json = Record<string, any>;
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
/** Well-formed but absent, so an allowed role's call acts on no record of the demo plant. */
const ABSENT_ID = '2147483000';

function walk(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = path.join(dir, d.name);
    return d.isDirectory() ? walk(p) : /\.(ts|js|mjs)$/.test(d.name) ? [p] : [];
  });
}

interface RouteFile {
  file: string;
  /** `/api/v1/alarms/{id}/ack` */
  apiPath: string;
  source: string;
  /** Each exported verb with its handler's source (from its `export const` to the next one). */
  handlers: Map<string, string>;
}

function routeFiles(): RouteFile[] {
  const pages = path.join(root, 'src/pages');
  return walk(path.join(pages, 'api'))
    .sort()
    .map((file) => {
      const rel = path.relative(pages, file).replace(/\\/g, '/');
      const apiPath = ('/' + rel.replace(/\.(ts|js|mjs)$/, '').replace(/\/index$/, '')).replace(/\[(\.\.\.)?([^\]]+)\]/g, '{$2}');
      const source = fs.readFileSync(file, 'utf8');
      const starts = [...source.matchAll(/export\s+const\s+(GET|POST|PUT|PATCH|DELETE)\b/g)];
      const handlers = new Map<string, string>();
      starts.forEach((m, i) => handlers.set(m[1]!, source.slice(m.index, starts[i + 1]?.index ?? source.length)));
      return { file: path.relative(root, file), apiPath, source, handlers };
    });
}

const routes = routeFiles();
let doc: Json;
const sessions = new Map<Role, Session>();
const ajv = new Ajv2020({ strict: false, allErrors: true, validateFormats: false });
/** Query values arrive as strings: judge them as the endpoint's coercing schemas do. */
const ajvQuery = new Ajv2020({ strict: false, coerceTypes: true, validateFormats: true });
ajvQuery.addFormat('date-time', (v: string) => !Number.isNaN(Date.parse(v)) && /T/.test(v));
ajvQuery.addFormat('email', (v: string) => /^[^@\s]+@[^@\s]+$/.test(v));
/** Values to try, one of which a typed query parameter should refuse. */
const BAD_QUERY_VALUES = ['x', '', '-1', '0', '__no_such__', '99999999999', '1.5'];
let real: Record<string, Record<string, string>> = {};

/** Every documented operation: `METHOD /path` → operation object. */
function operations(): [string, string, Json][] {
  return Object.entries(doc['paths'] as Record<string, Json>).flatMap(([p, item]) =>
    Object.entries(item)
      .filter(([m]) => (METHODS as readonly string[]).includes(m.toUpperCase()))
      .map(([m, op]) => [m.toUpperCase(), p, op as Json] as [string, string, Json]),
  );
}

function compile(schema: Json) {
  return ajv.compile({ ...schema, components: doc['components'] });
}

async function call(
  method: string,
  url: string,
  opts: { session?: Session | undefined; body?: string | FormData; type?: string } = {},
): Promise<{ status: number; type: string; body: any }> {
  const headers = new Headers();
  if (opts.session) headers.set('cookie', opts.session.cookie);
  if (opts.type) headers.set('content-type', opts.type);
  // Astro refuses form-like bodies (text/plain, multipart) without a same-origin Origin header.
  if (method !== 'GET') headers.set('origin', base());
  const ac = new AbortController();
  const r = await fetch(`${base()}${url}`, {
    method,
    headers,
    body: opts.body ?? null,
    redirect: 'manual',
    signal: ac.signal,
  });
  const type = r.headers.get('content-type') ?? '';
  let body: any = null;
  // Event streams never end: read nothing from them.
  if (!type.startsWith('text/event-stream')) {
    const text = await r.text();
    try {
      body = text ? JSON.parse(text) : null;
    } catch {
      body = text;
    }
  }
  ac.abort();
  return { status: r.status, type, body };
}

function fill(p: string, values: Record<string, string> = {}): string {
  return p.replace(/\{([^}]+)\}/g, (_, n: string) => values[n] ?? (n === 'jobNumber' ? 'X-1' : ABSENT_ID));
}

function documentedStatuses(op: Json): number[] {
  return Object.keys(op['responses'] as Json).map(Number);
}

function allowedRole(op: Json): Role | undefined {
  return (op['x-coatrail-roles'] as Role[])[0];
}

beforeAll(async () => {
  const r = await api('/api/openapi.json');
  doc = r.body;
  for (const role of ROLES) sessions.set(role, await signIn(role));
  real = await realPathValues(sessions.get('engineer')!);
});

/** A URL for a GET with real path values of the demo plant (undefined when none was found). */
function realUrl(p: string): string | undefined {
  if (!/\{/.test(p)) return p;
  const prefix = Object.keys(real)
    .filter((k) => p.startsWith(k))
    .sort((a, b) => b.length - a.length)[0];
  return prefix ? fill(p, real[prefix]) : undefined;
}

describe('GET /api/openapi.json', () => {
  it('is public and is a valid OpenAPI 3.1 document', async () => {
    const r = await api('/api/openapi.json');
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toContain('application/json');
    expect(r.body.openapi).toBe('3.1.0');
    expect(r.body.info.title).toBe('Coatrail API');
    const result = await new Validator().validate(r.body);
    expect(result.errors ?? [], 'OpenAPI 3.1 schema violations').toEqual([]);
    expect(result.valid).toBe(true);
  });

  it('documents every verb of every route file, and nothing that no route file exports', () => {
    const exported = routes.flatMap((r) => [...r.handlers.keys()].map((m) => `${m} ${r.apiPath}`)).sort();
    const documented = operations()
      .map(([m, p]) => `${m} ${p}`)
      .sort();
    expect(
      exported.filter((k) => !documented.includes(k)),
      "undocumented: export `contract = { VERB: operation({...}) }` from the route file (DEVELOPERS.md, 'an API route')",
    ).toEqual([]);
    expect(
      documented.filter((k) => !exported.includes(k)),
      'documented but exported by no route file',
    ).toEqual([]);
  });

  it('names the security schemes, and per operation its permission, roles and problem+json errors', () => {
    expect(Object.keys(doc['components'].securitySchemes)).toEqual(['session', 'bearer']);
    for (const [method, p, op] of operations()) {
      const key = `${method} ${p}`;
      const permission = op['x-coatrail-permission'] as string;
      expect(permission, key).toBeTruthy();
      if (permission === 'public') expect(op['security'], key).toEqual([]);
      else {
        expect(op['security'], key).toEqual([{ session: [] }, { bearer: [] }]);
        expect(op['description'], key).toContain(`permission \`${permission}\``);
        expect(documentedStatuses(op), key).toEqual(expect.arrayContaining([401]));
      }
      for (const [status, response] of Object.entries(op['responses'] as Record<string, Json>)) {
        if (Number(status) >= 400 && Number(status) !== 503) {
          expect(response['content']?.['application/problem+json']?.schema, `${key} ${status}`).toEqual({
            $ref: '#/components/schemas/Problem',
          });
        }
      }
      const path = (op['parameters'] ?? []).filter((x: Json) => x['in'] === 'path').map((x: Json) => x['name']);
      expect(path, `${key}: path parameters`).toEqual([...p.matchAll(/\{([^}]+)\}/g)].map((m) => m[1]));
    }
  });
});

describe('route files use their own contract (one schema per contract)', () => {
  it.each(routes.map((r) => [r.file, r] as const))('%s', (_file, route) => {
    expect(route.source, 'exports its contract').toMatch(/export const contract = \{/);
    for (const [verb, handler] of route.handlers) {
      const op = doc['paths'][route.apiPath]?.[verb.toLowerCase()] as Json | undefined;
      expect(op, `${verb} is documented`).toBeDefined();
      const where = `${route.file} ${verb}`;
      const guards = [...handler.matchAll(/requireRole\(\s*[\w.]+\s*,\s*([^)]+)\)/g)].map((m) => m[1]!.trim());
      const viaCalc = handler.match(/calcRoute\(\s*([\w.]+)\s*,/)?.[1];
      if (op!['x-coatrail-permission'] === 'public') {
        expect(guards, `${where}: public, so no guard`).toEqual([]);
      } else if (viaCalc) {
        expect(viaCalc, `${where}: calcRoute takes the contract`).toBe(`contract.${verb}`);
      } else {
        expect(guards, `${where}: guard with contract.${verb}.action`).toEqual([`contract.${verb}.action`]);
      }
      for (const m of handler.matchAll(/\b(readJson|readQuery)\(\s*[\w.]+\s*,\s*([^)]+)\)/g)) {
        const want = m[1] === 'readJson' ? 'body' : 'query';
        // A second argument is the route's body cap (BODY_LIMITS): the schema is still the contract's.
        expect(m[2]!.split(',')[0]!.trim(), `${where}: ${m[1]} with the contract's ${want}`).toBe(`contract.${verb}.${want}`);
      }
      for (const m of handler.matchAll(/\bvalidate\(\s*([^,]+),/g)) {
        expect(m[1]!.trim(), `${where}: validate with the contract`).toMatch(new RegExp(`^contract\\.${verb}\\.`));
      }
      if (/\bsearchParams\b/.test(handler)) {
        expect(op!['parameters'] ?? op!['requestBody'], `${where} reads the query string: document it`).toBeDefined();
      }
      if (/\breadJson\(/.test(handler)) expect(op!['requestBody'], `${where}: body documented`).toBeDefined();
      if (/\breadQuery\(/.test(handler)) {
        expect(
          (op!['parameters'] ?? []).some((x: Json) => x['in'] === 'query'),
          `${where}: query documented`,
        ).toBe(true);
      }
    }
  });
});

describe('each operation answers as documented', () => {
  it('anonymous callers get 401 problem+json wherever a permission is documented', async () => {
    const wrong: string[] = [];
    for (const [method, p, op] of operations()) {
      if (op['x-coatrail-permission'] === 'public') continue;
      const r = await call(method, fill(p), method === 'GET' ? {} : { body: '{}', type: 'application/json' });
      if (r.status !== 401 || !r.type.includes('application/problem+json')) wrong.push(`${method} ${p}: ${r.status}`);
    }
    expect(wrong).toEqual([]);
  });

  it('the documented roles pass the guard and no other role does', async () => {
    const wrong: string[] = [];
    for (const [method, p, op] of operations()) {
      if (op['x-coatrail-permission'] === 'public') continue;
      const roles = op['x-coatrail-roles'] as Role[];
      for (const role of ROLES) {
        const r = await call(method, fill(p), {
          session: sessions.get(role),
          ...(method === 'GET' ? {} : { body: '{}', type: 'application/json' }),
        });
        const allowed = roles.includes(role);
        if (allowed ? [401, 403].includes(r.status) : r.status !== 403) {
          wrong.push(`${method} ${p} as ${role}: ${r.status} (documented roles: ${roles.join(', ')})`);
        }
        if (r.status >= 400 && r.status < 500 && !documentedStatuses(op).includes(r.status)) {
          wrong.push(`${method} ${p} as ${role}: ${r.status} is not documented`);
        }
      }
    }
    expect(wrong).toEqual([]);
  });

  it('a JSON body that breaks the documented schema gets a documented 400 (a non-JSON body 415)', async () => {
    const wrong: string[] = [];
    let checked = 0;
    for (const [method, p, op] of operations()) {
      const schema = op['requestBody']?.content?.['application/json']?.schema as Json | undefined;
      if (!schema) continue;
      const role = allowedRole(op);
      const session = role ? sessions.get(role) : undefined;
      // A value the documented schema refuses (checked with the document's own schema first).
      const bad = [[], 'not an object', 42, { '': null }].find((v) => !compile(schema)(v));
      expect(bad, `${method} ${p}: no refused body found`).toBeDefined();
      const hasPathId = /\{/.test(p);
      const r = await call(method, fill(p), { session, body: JSON.stringify(bad), type: 'application/json' });
      const ok = hasPathId ? [400, 404].includes(r.status) : r.status === 400;
      if (!ok || !r.type.includes('application/problem+json') || !documentedStatuses(op).includes(r.status)) {
        wrong.push(`${method} ${p} with ${JSON.stringify(bad)}: ${r.status}`);
      } else if (r.status === 400 && !Array.isArray(r.body?.errors) && r.body?.title !== 'Malformed JSON') {
        wrong.push(`${method} ${p}: 400 without field errors`);
      }
      const t = await call(method, fill(p), { session, body: 'x', type: 'text/plain' });
      const tOk = hasPathId ? [404, 415].includes(t.status) : t.status === 415;
      if (!tOk || !documentedStatuses(op).includes(t.status)) wrong.push(`${method} ${p} as text/plain: ${t.status}`);
      checked++;
    }
    expect(checked).toBeGreaterThan(50);
    expect(wrong).toEqual([]);
  });
});

describe('a query value the documented schema refuses gets a documented 400', () => {
  it('every operation with query parameters', async () => {
    const wrong: string[] = [];
    const unconstrained: string[] = [];
    for (const [method, p, op] of operations()) {
      const params = ((op['parameters'] ?? []) as Json[]).filter((x) => x['in'] === 'query');
      if (!params.length) continue;
      const url = realUrl(p);
      if (!url) {
        wrong.push(`${method} ${p}: no record of the demo plant found for its path parameters`);
        continue;
      }
      let bad: [string, string] | undefined;
      for (const param of params) {
        const check = ajvQuery.compile({ type: 'object', properties: { v: param['schema'] } });
        const value = BAD_QUERY_VALUES.find((v) => !check({ v }));
        if (value !== undefined) {
          bad = [param['name'], value];
          break;
        }
      }
      if (!bad) {
        unconstrained.push(`${method} ${p}`);
        continue;
      }
      const role = allowedRole(op);
      const r = await call(method, `${url}?${new URLSearchParams([bad])}`, {
        session: role ? sessions.get(role) : undefined,
        ...(method === 'GET' ? {} : { body: '{}', type: 'application/json' }),
      });
      if (r.status !== 400 || !r.type.includes('application/problem+json') || !documentedStatuses(op).includes(400)) {
        wrong.push(`${method} ${p}?${bad[0]}=${bad[1]}: ${r.status}`);
      } else if (!r.body.errors.some((e: Json) => String(e['path']).startsWith(bad[0]) || e['path'] === '(body)')) {
        wrong.push(`${method} ${p}?${bad[0]}=${bad[1]}: the errors do not name ${bad[0]}: ${JSON.stringify(r.body.errors)}`);
      }
    }
    expect(wrong).toEqual([]);
    // Free-form text parameters (a search prefix, a list of event kinds) refuse nothing.
    expect(unconstrained.sort()).toEqual(['GET /api/v1/quality/files/{id}', 'GET /api/v1/stream']);
  });
});

/** Real path values from the demo plant, found through the documented list operations. */
async function realPathValues(session: Session): Promise<Record<string, Record<string, string>>> {
  const first = async (url: string, pick: (b: any) => unknown): Promise<string | undefined> => {
    const r = await call('GET', url, { session });
    if (r.status !== 200) return undefined;
    const v = pick(r.body);
    return v === undefined || v === null ? undefined : typeof v === 'object' ? JSON.stringify(v) : String(v as string | number);
  };
  const list = (b: any) => (Array.isArray(b) ? b : (b?.items ?? b?.surveys ?? b?.rows ?? b?.points ?? []));
  const id = (b: any) => list(b)[0]?.id;
  const out: Record<string, Record<string, string>> = {};
  const put = (prefix: string, values: Record<string, string | undefined>) => {
    if (Object.values(values).every((v) => v !== undefined)) out[prefix] = values as Record<string, string>;
  };
  const characteristic = await first('/api/v1/characteristics', id);
  if (characteristic) {
    put('/api/v1/characteristics/{id}/limit-sets/{setId}', {
      id: characteristic,
      setId: await first(`/api/v1/characteristics/${characteristic}/limit-sets`, id),
    });
    put('/api/v1/characteristics/{id}/points/{pointId}', {
      id: characteristic,
      pointId: await first(`/api/v1/characteristics/${characteristic}/points?last=5`, (b) => b?.points?.[0]?.id),
    });
  }
  // Records the demo plant may lack are made through their documented operations.
  if (!(await first('/api/v1/nonconformances', id))) {
    const failed = await first('/api/v1/quality/tests?result=fail', id);
    const quality = sessions.get('quality')!;
    const made = await call('POST', '/api/v1/nonconformances', {
      session: quality,
      body: JSON.stringify({ title: 'OpenAPI check: documented answer shapes', testIds: [Number(failed)] }),
      type: 'application/json',
    });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
  }
  put('/api/v1/nonconformances/{id}', { id: await first('/api/v1/nonconformances', id) });
  if (!(await first('/api/v1/gauges/studies', id))) {
    const quality = sessions.get('quality')!;
    const gauge = await call('POST', '/api/v1/gauges', {
      session: quality,
      body: JSON.stringify({ name: `OpenAPI check gauge ${Date.now()}`, kind: 'thickness', unit: 'µm' }),
      type: 'application/json',
    });
    expect(gauge.status, JSON.stringify(gauge.body)).toBe(201);
    // AIAG MSA 4th ed. bias example readings (reference 6.00).
    const readings = [5.8, 5.7, 5.9, 5.9, 6.0, 6.1, 6.0, 6.1, 6.4, 6.3, 6.0, 6.1, 6.2, 5.6, 6.0];
    const study = await call('POST', '/api/v1/gauges/studies', {
      session: quality,
      body: JSON.stringify({ kind: 'bias', gaugeId: gauge.body.id, title: 'OpenAPI check: bias', reference: 6, readings }),
      type: 'application/json',
    });
    expect(study.status, JSON.stringify(study.body)).toBe(201);
  }
  put('/api/v1/gauges/studies/{id}', {
    id: await first('/api/v1/gauges/studies', (b) => (Array.isArray(b?.studies) ? b.studies[0]?.id : undefined)),
  });
  const testId = await first('/api/v1/quality/tests', id);
  const form = new FormData();
  form.append('file', new Blob(['wavelength_nm,reflectance_pct\n500,4.1\n510,4.3\n'], { type: 'text/csv' }), 'openapi-check.csv');
  const uploaded = await call('POST', `/api/v1/quality/tests/${testId}/files`, { session: sessions.get('quality')!, body: form });
  expect(uploaded.status, JSON.stringify(uploaded.body)).toBe(201);
  put('/api/v1/quality/files/{id}', { id: uploaded.body?.id });
  // Any other `<list>/{param}`: the first record of the documented list (its `param` or `id`).
  for (const [, p] of operations()) {
    const m = p.match(/^(.*?)\/\{([^}]+)\}/);
    if (!m || out[`${m[1]}/{${m[2]}}`] || m[1] === '/api/v1/trace/jobs') continue;
    const name = m[2]!;
    put(`${m[1]}/{${name}}`, { [name]: await first(m[1]!, (b) => list(b)[0]?.[name] ?? list(b)[0]?.id) });
  }
  put('/api/v1/trace/jobs/{jobNumber}', { jobNumber: await first('/api/v1/quality/tests', (b) => list(b)[0]?.jobNumber) });
  return out;
}

describe('success answers validate against the documented response schemas', () => {
  it('every GET, with real records for its path parameters', async () => {
    const wrong: string[] = [];
    let validated = 0;
    for (const [method, p, op] of operations()) {
      if (method !== 'GET') continue;
      const role = allowedRole(op);
      const session = role ? sessions.get(role) : undefined;
      let url = realUrl(p);
      if (!url) {
        wrong.push(`${method} ${p}: no record of the demo plant found for its path parameters`);
        continue;
      }
      const required = (op['parameters'] ?? []).filter((x: Json) => x['in'] === 'query' && x['required']);
      if (required.length) {
        // The only GET with a required query names an asset: use a line of the demo plant.
        const asset = (await call('GET', '/api/v1/assets', { session })).body.find((a: Json) => a['kind'] === 'line');
        url += `?${required.map((x: Json) => `${x['name']}=${asset.id}`).join('&')}`;
      }
      const r = await call(method, url, { session });
      const response = op['responses'][String(r.status)] as Json | undefined;
      if (!response || r.status >= 400) {
        wrong.push(`${method} ${url}: ${r.status} ${JSON.stringify(r.body)?.slice(0, 200)}`);
        continue;
      }
      const media = Object.keys(response['content'] ?? {});
      const type = r.type.split(';')[0]!.trim();
      if (!media.includes(type)) {
        wrong.push(`${method} ${url}: answered ${type}, documented ${media.join(', ')}`);
        continue;
      }
      if (type === 'application/json') {
        const check = compile(response['content'][type].schema);
        if (!check(r.body)) {
          wrong.push(`${method} ${url}: ${ajv.errorsText(check.errors, { separator: '; ' }).slice(0, 600)}`);
        }
        validated++;
      }
      if (response['content']['text/csv']) {
        const csv = await call(method, `${url}${url.includes('?') ? '&' : '?'}format=csv`, { session });
        if (csv.status !== 200 || !csv.type.startsWith('text/csv'))
          wrong.push(`${method} ${url}?format=csv: ${csv.status} ${csv.type}`);
      }
    }
    expect(wrong).toEqual([]);
    expect(validated).toBeGreaterThan(40);
  });

  it('stateless POSTs (SPC evaluate, calculators) answer what their schemas document', async () => {
    const session = sessions.get('viewer')!;
    const examples: Record<string, unknown> = {
      // Any five subgroups of five: what is checked here is the answer's shape, not its figures.
      '/api/v1/spc/evaluate': {
        chart: 'xbar-r',
        subgroups: [
          [1.3235, 1.4128, 1.6744, 1.4573, 1.6914],
          [1.4314, 1.3592, 1.6075, 1.4666, 1.6109],
          [1.4284, 1.4871, 1.4932, 1.4324, 1.5674],
          [1.5028, 1.6352, 1.3841, 1.2831, 1.5507],
          [1.5604, 1.2735, 1.5265, 1.4363, 1.6441],
        ],
      },
      '/api/v1/calc/dip-thickness': { viscosityMPaS: 5, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 950 },
      '/api/v1/calc/viscosity-cup': { cup: 'zahn-2', seconds: 30 },
      '/api/v1/calc/crosscut': { percentRemoved: 3 },
      '/api/v1/calc/fringe-thickness': { lambda1Nm: 600, lambda2Nm: 500, refractiveIndex: 1.5 },
      '/api/v1/calc/abrasion': { referenceHazeGainPct: 10, testHazeGainPct: 2 },
    };
    const wrong: string[] = [];
    for (const [p, body] of Object.entries(examples)) {
      const op = doc['paths'][p].post as Json;
      const r = await call('POST', p, { session, body: JSON.stringify(body), type: 'application/json' });
      const schema = op['responses'][String(r.status)]?.content?.['application/json']?.schema;
      if (r.status !== 200 || !schema) {
        wrong.push(`${p}: ${r.status} ${JSON.stringify(r.body).slice(0, 200)}`);
        continue;
      }
      const check = compile(schema);
      if (!check(r.body)) wrong.push(`${p}: ${ajv.errorsText(check.errors)}`);
    }
    expect(wrong).toEqual([]);
  });
});
