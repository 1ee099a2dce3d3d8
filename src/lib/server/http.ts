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

/**
 * Request-body caps (bytes). Every body is read through readBody, which stops at the cap while
 * streaming (chunked bodies included) and answers 413. `json`: sign-in, reset and every ordinary
 * JSON body; `bulkJson`: JSON bodies that carry a file's text (survey, job-import and spectrum
 * CSVs, SPC data sets); `upload`: multipart file uploads (the 5 MB attachment limit plus framing);
 * `form`: the sign-in pages' HTML forms.
 */
export const BODY_LIMITS = {
  json: 64 * 1024,
  bulkJson: 6 * 1024 * 1024,
  upload: 6 * 1024 * 1024,
  form: 16 * 1024,
} as const;

function tooLarge(maxBytes: number): HttpProblem {
  const size = maxBytes >= 1024 * 1024 ? `${maxBytes / 1024 / 1024} MiB` : `${maxBytes / 1024} KiB`;
  return new HttpProblem(413, 'Request body too large', `This endpoint accepts at most ${size}.`, { maxBytes });
}

/**
 * The whole body, but never more than `maxBytes`: a declared Content-Length above the cap is
 * refused before reading, and a body without one (chunked) is cancelled as soon as it passes
 * the cap. Throws a 413 problem either way.
 */
export async function readBody(request: Request, maxBytes: number): Promise<Uint8Array<ArrayBuffer>> {
  const declared = Number(request.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes) {
    await request.body?.cancel().catch(() => {});
    throw tooLarge(maxBytes);
  }
  if (!request.body) return new Uint8Array(new ArrayBuffer(0));
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw tooLarge(maxBytes);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(new ArrayBuffer(total));
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

/** A form body (urlencoded or multipart) read through readBody's cap; a malformed body → 400. */
export async function readForm(request: Request, maxBytes: number = BODY_LIMITS.form): Promise<FormData> {
  const bytes = await readBody(request, maxBytes);
  try {
    return await new Response(bytes, { headers: { 'content-type': request.headers.get('content-type') ?? '' } }).formData();
  } catch {
    throw new HttpProblem(400, 'Malformed form', 'The form body could not be read.');
  }
}

/** Read and validate a JSON body of at most `maxBytes` (BODY_LIMITS.json unless the route documents more). */
export async function readJson<S extends z.ZodType>(
  request: Request,
  schema: S,
  maxBytes: number = BODY_LIMITS.json,
): Promise<z.infer<S>> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('json')) {
    throw new HttpProblem(415, 'Unsupported media type', 'Send the body as application/json.');
  }
  const bytes = await readBody(request, maxBytes);
  let body: unknown;
  try {
    body = JSON.parse(new TextDecoder('utf-8').decode(bytes));
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

/**
 * A `next=` target that stays on this site: a path starting with one `/`, without backslashes
 * or control characters (browsers read `/\host` and `/<tab>/host` as another host), whose
 * resolution against our origin keeps our origin. Anything else → `/`.
 */
export function safeNextPath(raw: string | null | undefined, origin: string): string {
  if (!raw || !raw.startsWith('/') || raw.startsWith('//')) return '/';
  if (/[\\\u0000-\u001f\u007f]/.test(raw)) return '/';
  try {
    const u = new URL(raw, origin);
    if (u.origin !== new URL(origin).origin) return '/';
    return `${u.pathname}${u.search}${u.hash}`;
  } catch {
    return '/';
  }
}

/** Earliest instant any range query accepts (2000-01-01T00:00Z): older `from` values are refused. */
export const EARLIEST_RANGE_MS = Date.UTC(2000, 0, 1);

/**
 * A time range made safe: `to` defaults to now and `from` to `to - defaultSpanMs`; `from` before
 * 2000, `from` not before `to`, or a span over `maxSpanMs` → a 400 problem naming the field.
 */
export function boundedRange(
  fromMs: number | null,
  toMs: number | null,
  opts: { defaultSpanMs: number; maxSpanMs: number; nowMs?: number },
): { fromMs: number; toMs: number } {
  const to = toMs ?? opts.nowMs ?? Date.now();
  const from = fromMs ?? to - opts.defaultSpanMs;
  const bad = (path: string, message: string) =>
    new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });
  if (!Number.isFinite(from) || from < EARLIEST_RANGE_MS) throw bad('from', 'must be 2000-01-01 or later.');
  if (!Number.isFinite(to) || to < EARLIEST_RANGE_MS) throw bad('to', 'must be 2000-01-01 or later.');
  if (from >= to) throw bad('from', 'must be before to.');
  if (to - from > opts.maxSpanMs) throw bad('to', `at most ${Math.round(opts.maxSpanMs / 86_400_000)} days at once.`);
  return { fromMs: from, toMs: to };
}
