import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../lib/server/http.ts';
import { getDipRun } from '../../../../lib/server/services/dips.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { DipRunSchema } from '../../../../lib/shared/api/production.ts';

export const contract = {
  GET: operation({
    summary: 'One dip run with its jobs, bath charge, last check and stroke speed',
    tag: 'production',
    action: 'view',
    responses: { 200: DipRunSchema },
  }),
};

/** One dip run with its jobs, bath charge, last check and stroke speed. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  const run = await getDipRun(idParam(params['id'], 'dip run'));
  if (!run) throw new HttpProblem(404, 'Not found', 'No such dip run.');
  return Response.json(run);
};
