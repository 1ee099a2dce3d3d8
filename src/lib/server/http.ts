/**
 * HTTP helpers: RFC 9457 problem details for every failure, and JSON body reading
 * validated by a zod schema (a 400 with field paths, never a 500 for bad input).
 */
import type { z } from 'zod';
import { DomainError, type DomainErrorKind, type FieldError } from '../core/errors.ts';

export type { FieldError };

/** A failure that the middleware turns into an application/problem+json response. */
export class HttpProblem extends Error {
  constructor(
    public status: number,
    public title: string,
    public detail?: string,
    public extra: Record<string, unknown> = {},
  ) {
    super(detail ?? title);
  }
}

/** The HTTP status of each kind of core error (the core itself knows nothing of HTTP). */
export const DOMAIN_ERROR_STATUS: Record<DomainErrorKind, number> = {
  invalid: 400,
  'not-found': 404,
  conflict: 409,
  'too-large': 413,
  'unsupported-media': 415,
  unprocessable: 422,
};

/** A core error as the problem the web layer answers with. */
export function problemFromDomainError(e: DomainError): HttpProblem {
  return new HttpProblem(DOMAIN_ERROR_STATUS[e.kind], e.title, e.detail, e.extra);
}

export function problemResponse(status: number, title: string, detail?: string, extra: Record<string, unknown> = {}): Response {
  return new Response(JSON.stringify({ type: 'about:blank', title, status, ...(detail ? { detail } : {}), ...extra }), {
    status,
    headers: { 'content-type': 'application/problem+json' },
  });
}

export function zodErrors(error: z.ZodError): FieldError[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.') || '(body)', message: i.message }));
}

/** Validate a value against a schema or throw a 400 problem listing the offending fields. */
export function validate<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  const parsed = schema.safeParse(value);
  if (!parsed.success) {
    const errors = zodErrors(parsed.error);
    throw new HttpProblem(400, 'Invalid input', errors.map((e) => `${e.path}: ${e.message}`).join('; '), { errors });
  }
  return parsed.data;
}

/** Read and validate a JSON body. */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('json')) {
    throw new HttpProblem(415, 'Unsupported media type', 'Send the body as application/json.');
  }
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    throw new HttpProblem(400, 'Malformed JSON', 'The request body is not valid JSON.');
  }
  return validate(schema, body);
}

/** Parse a positive integer route parameter or throw 404. */
export function idParam(value: string | undefined, what = 'record'): number {
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0 || n > 2_147_483_647) throw new HttpProblem(404, 'Not found', `No such ${what}.`);
  return n;
}

/** Query-string values validated by a schema. */
export function readQuery<S extends z.ZodType>(url: URL, schema: S): z.infer<S> {
  return validate(schema, Object.fromEntries(url.searchParams.entries()));
}
