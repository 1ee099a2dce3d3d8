/**
 * Response shapes shared by many API operations: the RFC 9457 problem, list pages, and small
 * acknowledgements. The per-area answers live beside this file (`plant.ts`, `alarms.ts`, …);
 * each is the shape the service returns, and the OpenAPI document shows exactly these.
 */
import { z } from 'zod';

/** One offending field of a 400 answer: a dotted path into the body or query, and why. */
export const FieldErrorSchema = z.object({ path: z.string(), message: z.string() });

/** RFC 9457 problem details, as every 4xx/5xx of the API answers (`application/problem+json`). */
export const ProblemSchema = z
  .looseObject({
    type: z.string(),
    title: z.string(),
    status: z.int(),
    detail: z.string().optional(),
    errors: z.array(FieldErrorSchema).optional(),
  })
  .meta({ id: 'Problem', description: 'RFC 9457 problem details; `errors` lists each offending field path.' });
export type Problem = z.infer<typeof ProblemSchema>;

/** A date-time as the API writes it (ISO 8601, UTC, from `Date.toJSON`). */
export const DateTimeSchema = z.string().meta({ format: 'date-time' });
/** A date-time or null. */
export const NullableDateTimeSchema = DateTimeSchema.nullable();

/** A record id. */
export const IdSchema = z.int().positive();

/** A server-paged list: `{items, nextCursor}` (null when there is no further page). */
export function pageOf<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item), nextCursor: z.string().nullable() });
}

/**
 * A record documented by the fields every client relies on; the service may add others
 * (`additionalProperties` allowed), which are not part of the contract.
 */
export function recordOf<S extends z.core.$ZodLooseShape>(shape: S) {
  return z.looseObject(shape);
}
