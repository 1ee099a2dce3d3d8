/**
 * The OpenAPI 3.1 document of Coatrail's API (served at `GET /api/openapi.json`), generated
 * from the routes' own contracts: every route file under `src/pages/api` exports
 * `contract = { VERB: operation({...}) }` (see `api-operation.ts`), and its handler guards
 * and validates with those same objects. Method and path come from the file's place; the
 * schemas become JSON Schema through `@asteasolutions/zod-to-openapi` (made for zod 4).
 * Nothing is listed by hand here: a new route is documented by its own contract.
 */
import { OpenAPIRegistry, OpenApiGeneratorV31, type RouteConfig } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';
import { ProblemSchema } from '../shared/api/common.ts';
import { PERMISSIONS, ROLES, type Role } from '../shared/roles.ts';
import {
  API_TAGS,
  IdParamSchema,
  METHODS,
  type Contract,
  type MediaResponse,
  type Method,
  type OperationSpec,
} from './api-operation.ts';

/** Every route module's `contract`, loaded when the document is first asked for. */
const ROUTE_CONTRACTS = import.meta.glob<Contract | undefined>('../../pages/api/**/*.ts', { import: 'contract' });

/** `../../pages/api/v1/alarms/[id]/ack.ts` → `/api/v1/alarms/{id}/ack`. */
export function apiPathOf(file: string): string {
  const rel = file.replace(/\\/g, '/').replace(/^.*?\/pages\//, '/');
  return rel
    .replace(/\.(ts|js|mjs)$/, '')
    .replace(/\/index$/, '')
    .replace(/\[(\.\.\.)?([^\]]+)\]/g, '{$2}');
}

/** The roles a permission allows (from `PERMISSIONS`, the one table). */
export function rolesFor(action: OperationSpec['action']): readonly Role[] {
  return action === 'public' ? [] : PERMISSIONS[action];
}

const SUCCESS: Record<number, string> = {
  200: 'OK',
  201: 'Created',
  202: 'Accepted',
  204: 'No content',
  503: 'Service unavailable (the answer names the failing part)',
};

const PROBLEM: Record<number, string> = {
  400: 'Invalid input: `errors` lists each field path and why',
  401: 'Not signed in (no session cookie or API token, or a revoked one)',
  403: 'Not allowed for this role (or a cross-site state change with a session cookie)',
  404: 'No such record',
  409: 'Conflicts with the record’s state (the detail says why)',
  410: 'Gone: used or expired',
  413: 'Too large',
  415: 'Unsupported media type',
  422: 'Well-formed but refused by the rules of the record',
  429: 'Too many attempts: wait and retry',
  503: 'A part the operation needs is not available',
};

function pathParamNames(path: string): string[] {
  return [...path.matchAll(/\{([^}]+)\}/g)].map((m) => m[1]!);
}

/** The 4xx an operation can answer: implied by its declaration, plus its own `problems`. */
export function problemsOf(method: Method, path: string, op: OperationSpec): number[] {
  const out = new Set<number>(op.problems ?? []);
  if (op.body || op.query || op.upload || op.params) out.add(400);
  if (op.body || op.upload) out.add(415);
  if (op.action !== 'public') {
    out.add(401);
    if (method !== 'GET' || rolesFor(op.action).length < ROLES.length) out.add(403);
  } else if (method !== 'GET') out.add(403);
  if (pathParamNames(path).length && !op.params) out.add(404);
  return [...out].sort((a, b) => a - b);
}

function isZod(x: unknown): x is z.ZodType {
  return x instanceof z.ZodType;
}

function successContent(answer: z.ZodType | MediaResponse | null): RouteConfig['responses'][string] {
  if (answer === null) return {};
  if (isZod(answer)) return { content: { 'application/json': { schema: answer } } };
  const content: Record<string, { schema: z.ZodType | Record<string, unknown> }> = {};
  if (answer.json) content['application/json'] = { schema: answer.json };
  if (answer.csv) content['text/csv'] = { schema: { type: 'string', description: 'CSV with a header row' } };
  if (answer.eventStream) content['text/event-stream'] = { schema: { type: 'string', description: 'Server-sent events' } };
  for (const media of answer.binary ?? []) content[media] = { schema: { type: 'string', contentMediaType: media } };
  return { ...(answer.description ? { description: answer.description } : {}), content };
}

function operationId(method: Method, path: string): string {
  return `${method.toLowerCase()}${path.replace(/[{}]/g, '').replace(/[^A-Za-z0-9]+(.)/g, (_, c: string) => c.toUpperCase())}`;
}

function routeConfig(method: Method, path: string, op: OperationSpec): RouteConfig {
  const roles = rolesFor(op.action);
  const names = pathParamNames(path);
  const params = op.params ?? (names.length ? z.object(Object.fromEntries(names.map((n) => [n, IdParamSchema]))) : undefined);
  const who =
    op.action === 'public'
      ? 'Public: no sign-in needed.'
      : `Roles: ${roles.join(', ')} (permission \`${op.action}\`); a session cookie or an API token of such a role.`;
  const request: NonNullable<RouteConfig['request']> = {};
  if (params) request.params = params;
  if (op.query) request.query = op.query;
  if (op.body) request.body = { required: true, content: { 'application/json': { schema: op.body } } };
  if (op.upload) {
    const content: Record<string, { schema: z.ZodType | Record<string, unknown> }> = {};
    for (const media of op.upload.media) {
      content[media] =
        media === 'multipart/form-data'
          ? { schema: (op.upload.fields ?? z.object({})).extend({ file: z.string().meta({ format: 'binary' }) }) }
          : { schema: { type: 'string', contentMediaType: 'text/csv' } };
    }
    request.body = { required: true, description: op.upload.note, content };
  }
  const responses: RouteConfig['responses'] = {};
  for (const [status, answer] of Object.entries(op.responses)) {
    responses[status] = { description: SUCCESS[Number(status)] ?? 'Success', ...successContent(answer ?? null) };
  }
  for (const status of problemsOf(method, path, op)) {
    responses[String(status)] ??= {
      description: PROBLEM[status] ?? 'Problem',
      content: { 'application/problem+json': { schema: ProblemSchema } },
    };
  }
  return {
    method: method.toLowerCase() as RouteConfig['method'],
    path,
    operationId: operationId(method, path),
    summary: op.summary,
    description: [op.description, who].filter(Boolean).join('\n\n'),
    tags: [op.tag],
    security: op.action === 'public' ? [] : [{ session: [] }, { bearer: [] }],
    'x-coatrail-permission': op.action,
    'x-coatrail-roles': [...roles],
    ...(Object.keys(request).length ? { request } : {}),
    responses,
  };
}

/** The document from (path, contract) pairs; routes without a contract are left out (the test names them). */
export function documentFrom(routes: [path: string, contract: Contract | undefined][], serverUrl?: string) {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'session', {
    type: 'apiKey',
    in: 'cookie',
    name: 'coatrail_session',
    description: 'Session cookie set by POST /api/auth/login',
  });
  registry.registerComponent('securitySchemes', 'bearer', {
    type: 'http',
    scheme: 'bearer',
    description: 'API token (Authorization: Bearer ct_…), created by an admin; acts with its role',
  });
  const sorted = [...routes].sort(([a], [b]) => a.localeCompare(b));
  for (const [path, contract] of sorted) {
    for (const method of METHODS) {
      const op = contract?.[method];
      if (op) registry.registerPath(routeConfig(method, path, op));
    }
  }
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Coatrail API',
      version: '1',
      description:
        'Coatrail: hard-coat process-window and cure-oven recorder for ophthalmic lens labs. JSON in and out. Errors are application/problem+json (RFC 9457) with a 4xx status and field paths. Each operation names the roles allowed. Calculators give estimates within their stated validity; the lacquer maker’s data and the lab’s validation govern. Alarms are advisory and are not a safety function.',
      license: { name: 'Proprietary' },
    },
    ...(serverUrl ? { servers: [{ url: serverUrl }] } : {}),
    security: [{ session: [] }, { bearer: [] }],
    tags: Object.entries(API_TAGS).map(([name, description]) => ({ name, description })),
  });
}

/** The whole document, from every route file's contract. */
export async function buildOpenApi(serverUrl?: string) {
  const routes = await Promise.all(
    Object.entries(ROUTE_CONTRACTS).map(
      async ([file, load]) => [apiPathOf(file), await load()] as [string, Contract | undefined],
    ),
  );
  return documentFrom(routes, serverUrl);
}
