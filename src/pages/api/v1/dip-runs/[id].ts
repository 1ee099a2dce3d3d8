import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../lib/server/http.ts';
import { getDipRun } from '../../../../lib/server/services/dips.ts';

/** One dip run with its jobs, bath charge, last check and stroke speed. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  const run = await getDipRun(idParam(params['id'], 'dip run'));
  if (!run) throw new HttpProblem(404, 'Not found', 'No such dip run.');
  return Response.json(run);
};
