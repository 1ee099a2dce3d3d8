import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../lib/server/http.ts';
import { getLoad } from '../../../../../lib/server/services/loads.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { LoadDetailSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  GET: operation({
    summary: 'One load: cure record and verdict, jobs, alarms during the load',
    tag: 'production',
    action: 'view',
    responses: { 200: LoadDetailSchema },
  }),
};

/** One load: cure record and verdict, jobs, alarms during the load. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  const load = await getLoad(idParam(params['id'], 'oven load'));
  if (!load) throw new HttpProblem(404, 'Not found', 'No such oven load.');
  return Response.json(load);
};
