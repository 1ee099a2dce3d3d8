import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { addJobs } from '../../../../../lib/server/services/loads.ts';
import { LoadAddJobsSchema } from '../../../../../lib/shared/jobs.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { LoadJobsAddedSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  POST: operation({
    summary: 'Scan jobs or racks into an open load',
    tag: 'production',
    action: 'load.manage',
    body: LoadAddJobsSchema,
    responses: { 200: LoadJobsAddedSchema },
    problems: [409],
  }),
};

/** Scan jobs and/or racks into an open load (operator, engineer). */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'oven load');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await addJobs(user, id, input, clientAddress));
};
