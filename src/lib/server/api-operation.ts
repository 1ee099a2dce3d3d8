/**
 * The contract of one API operation, declared beside its handler in the route file:
 *
 *   export const contract = {
 *     POST: operation({ summary, tag, action, body, responses: { 200: ResultSchema }, problems: [404] }),
 *   };
 *   export const POST: APIRoute = async ({ locals, request }) => {
 *     const user = requireRole(locals, contract.POST.action);
 *     const input = await readJson(request, contract.POST.body);
 *     …
 *
 * The endpoint guards and validates with the very objects the OpenAPI document is generated
 * from (`src/lib/server/openapi.ts` reads every route file's `contract`), so the two cannot
 * drift; `tests/api/openapi.test.ts` fails for a route that validates or guards with anything
 * else, or that exports a verb without a contract. Method and path come from the file itself.
 */
import { z } from 'zod';
import type { Action } from '../shared/roles.ts';

export const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type Method = (typeof METHODS)[number];

/** The document's tags (one per area of the product). */
export const API_TAGS = {
  service: 'Health, the API document and live events',
  auth: 'Signing in and out, password resets',
  admin: 'Users, API tokens, sign-in locks, mail log, audit trail',
  plant: 'Assets, channels, devices, readings, the floor, refused MQTT messages',
  alarms: 'Alarms, their settings and the alarm-system health figures',
  windows: 'Process windows, materials, lacquers and their assignment to lines and ovens',
  baths: 'Bath checks, additions, filter changes, lots and charges',
  production: 'Dip runs, jobs and oven loads',
  quality: 'Quality tests, acceptance, trace, holds and nonconformances',
  ovens: 'Oven uniformity surveys',
  spc: 'Stateless SPC, characteristics, control charts and control-limit studies',
  calculators: 'Stateless calculators (estimates within their stated validity)',
  msa: 'Gauges and measurement-system studies (gauge R&R, bias, linearity)',
} as const;
export type ApiTag = keyof typeof API_TAGS;

/**
 * The 4xx (and 503) a route can answer beyond those its declaration implies. Implied ones:
 * 400 with a body, query, upload or validated path parameter; 415 with a JSON body or an
 * upload; 401 and 403 unless public (403 also for cross-site cookie writes); 404 with a path
 * parameter.
 */
export type ExtraProblem = 400 | 401 | 403 | 404 | 409 | 410 | 413 | 415 | 422 | 429 | 503;

/** A success body in more than one form (e.g. JSON, or CSV with `?format=csv`). */
export interface MediaResponse {
  json?: z.ZodType;
  /** `text/csv` (a spreadsheet export). */
  csv?: true;
  /** `text/event-stream` (server-sent events). */
  eventStream?: true;
  /** Binary or stored-file media types (e.g. an attachment served as it was stored). */
  binary?: readonly string[];
  description?: string;
}

export type SuccessStatus = 200 | 201 | 202 | 204 | 503;

export interface OperationSpec {
  summary: string;
  description?: string;
  tag: ApiTag;
  /** The permission `requireRole` asks for (roles from `PERMISSIONS`), or 'public'. */
  action: Action | 'public';
  /** The JSON request body (`readJson(request, contract.X.body)`). */
  body?: z.ZodType;
  /** A file upload instead of a JSON body. */
  upload?: { note: string; media: readonly ('multipart/form-data' | 'text/csv')[]; fields?: z.ZodObject };
  /** Query parameters (`readQuery(url, contract.X.query)`): an object schema, possibly piped into a transform. */
  query?: z.ZodObject | z.ZodPipe<z.ZodObject, z.ZodType>;
  /**
   * Path parameters. Left out, each `[name]` of the file path is documented as a record id
   * (a positive 32-bit integer, 404 otherwise: `idParam`).
   */
  params?: z.ZodObject;
  /** Success answers by status: a JSON schema, several media, or null for no body. */
  responses: Partial<Record<SuccessStatus, z.ZodType | MediaResponse | null>>;
  problems?: readonly ExtraProblem[];
}

/** Declare one operation (an identity function that keeps the schemas' own types). */
export function operation<const T extends OperationSpec>(spec: T): T {
  return spec;
}

/** What a route file exports as `contract`: one operation per exported verb. */
export type Contract = Partial<Record<Method, OperationSpec>>;

/** A record id in a path, as `idParam` accepts it. */
export const IdParamSchema = z.coerce.number().int().min(1).max(2_147_483_647);
