import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../lib/server/http.ts';
import { getLoad } from '../../../../../lib/server/services/loads.ts';

/** One load: cure record and verdict, jobs, alarms during the load. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  const load = await getLoad(idParam(params['id'], 'oven load'));
  if (!load) throw new HttpProblem(404, 'Not found', 'No such oven load.');
  return Response.json(load);
};
