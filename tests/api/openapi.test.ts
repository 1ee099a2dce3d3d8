/**
 * The OpenAPI document, served by the app: public, OpenAPI 3.1, and every verb of every route file under src/pages/api is in it.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { api } from '../support/http.ts';
import { root } from '../support/test-stack.ts';

function walk(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = path.join(dir, d.name);
    return d.isDirectory() ? walk(p) : /\.(ts|js|mjs)$/.test(d.name) ? [p] : [];
  });
}

/** `METHOD /api/path/{param}` for every exported verb of every route file. */
function routeKeys(): string[] {
  const pages = path.join(root, 'src/pages');
  return walk(path.join(pages, 'api')).flatMap((file) => {
    const rel = path.relative(pages, file).replace(/\\/g, '/');
    const p = ('/' + rel.replace(/\.(ts|js|mjs)$/, '').replace(/\/index$/, '')).replace(/\[(\.\.\.)?([^\]]+)\]/g, '{$2}');
    const src = fs.readFileSync(file, 'utf8');
    return [...new Set([...src.matchAll(/export\s+const\s+(GET|POST|PUT|PATCH|DELETE)\b/g)].map((m) => m[1]!))].map(
      (m) => `${m} ${p}`,
    );
  });
}

describe('GET /api/openapi.json', () => {
  it('is public and is an OpenAPI 3.1 document', async () => {
    const r = await api('/api/openapi.json');
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toContain('application/json');
    expect(r.body.openapi).toBe('3.1.0');
    expect(r.body.info.title).toBe('Coatrail API');
  });

  it('documents every route file under src/pages/api (add a line to OPERATIONS in src/lib/server/openapi.ts)', async () => {
    const { body } = await api('/api/openapi.json');
    const documented = new Set(
      Object.entries(body.paths as Record<string, Record<string, unknown>>).flatMap(([p, ops]) =>
        Object.keys(ops).map((m) => `${m.toUpperCase()} ${p}`),
      ),
    );
    const missing = routeKeys().filter((k) => !documented.has(k));
    expect(missing, 'routes missing from the OpenAPI document').toEqual([]);
  });

  it('request bodies come from the zod schemas (units in the field names)', async () => {
    const { body } = await api('/api/openapi.json');
    const dip = body.paths['/api/v1/calc/dip-thickness'].post.requestBody.content['application/json'].schema;
    expect(Object.keys(dip.properties)).toEqual(
      expect.arrayContaining(['viscosityMPaS', 'speedMmS', 'surfaceTensionMNm', 'densityKgM3', 'solidsVolumeFraction']),
    );
    expect(dip.required).toEqual(expect.arrayContaining(['viscosityMPaS', 'speedMmS']));
    expect(dip.properties.speedMmS.exclusiveMinimum).toBe(0);
    const approve = body.paths['/api/v1/windows/{id}/approve'].post;
    expect(approve.requestBody.content['application/json'].schema.properties.meaning.const).toBe('approved');
    expect(approve.parameters[0]).toMatchObject({ name: 'id', in: 'path' });
    expect(body.paths['/api/v1/calc/fringe-thickness/spectrum'].post.responses['413']).toBeDefined();
  });
});
