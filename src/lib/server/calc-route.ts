/**
 * One shape for every calculator endpoint (`POST /api/v1/calc/*`): guard (`calc.use`, any
 * signed-in role), validate with the shared zod schema, answer with the pure domain function.
 * A RangeError from the domain (input the schema let through but the model refuses) becomes a
 * 400 problem, never a 500.
 */
import type { APIRoute } from 'astro';
import type { z } from 'zod';
import type { Action } from '../shared/roles.ts';
import { requireRole } from './guard.ts';
import { HttpProblem, readJson } from './http.ts';

/** Takes the route's own contract (`contract.POST`): the guard and the schema are the documented ones. */
export function calcRoute<S extends z.ZodType>(
  op: { action: Action; body: S },
  compute: (input: z.infer<S>) => unknown,
  /** The body cap (BODY_LIMITS.json unless the calculator takes long profiles). */
  maxBytes?: number,
): APIRoute {
  return async ({ locals, request }) => {
    requireRole(locals, op.action);
    const input = await readJson(request, op.body, maxBytes);
    let result: unknown;
    try {
      result = compute(input);
    } catch (e) {
      if (e instanceof RangeError)
        throw new HttpProblem(400, 'Invalid input', e.message, { errors: [{ path: '(body)', message: e.message }] });
      throw e;
    }
    return Response.json(result);
  };
}

/** A refusal of the model (a valid request it cannot answer) as a 400 problem on a field. */
export function refusal(title: string, reason: string, path: string): HttpProblem {
  return new HttpProblem(400, title, reason, { errors: [{ path, message: reason }] });
}
