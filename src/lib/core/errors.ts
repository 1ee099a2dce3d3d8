/**
 * Errors of the worker-safe core. The core knows nothing of HTTP: it says what went wrong in
 * the record's own terms, and the web layer (src/middleware.ts, via `problemFromDomainError`
 * in lib/server/http.ts) maps each kind to its status and an RFC 9457 problem. The worker and
 * the seeds branch on `kind`, never on a status code.
 */
export type DomainErrorKind =
  | 'invalid' // the input breaks a rule of the record (400)
  | 'not-found' // no such record (404)
  | 'conflict' // the record is not in a state that allows this (409)
  | 'too-large' // the input is over its documented cap (413)
  | 'unsupported-media' // a file of a type the record does not take (415)
  | 'unprocessable'; // well-formed, but the content cannot be judged (422)

export interface FieldError {
  path: string;
  message: string;
}

export class DomainError extends Error {
  constructor(
    public readonly kind: DomainErrorKind,
    public readonly title: string,
    public readonly detail?: string,
    public readonly extra: { errors?: FieldError[]; [key: string]: unknown } = {},
  ) {
    super(detail ?? title);
    this.name = 'DomainError';
  }
}

/** An `invalid` error naming one field, the shape the API's validation errors have. */
export function fieldError(
  path: string,
  message: string,
  kind: DomainErrorKind = 'invalid',
  title = 'Invalid input',
): DomainError {
  return new DomainError(kind, title, `${path}: ${message}`, { errors: [{ path, message }] });
}

export function isDomainError(e: unknown, ...kinds: DomainErrorKind[]): e is DomainError {
  return e instanceof DomainError && (kinds.length === 0 || kinds.includes(e.kind));
}
