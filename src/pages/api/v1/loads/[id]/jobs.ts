import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { addJobs } from '../../../../../lib/server/services/loads.ts';
import { LoadAddJobsSchema } from '../../../../../lib/shared/jobs.ts';

/** Scan jobs and/or racks into an open load (operator, engineer). */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'load.manage');
  const id = idParam(params['id'], 'oven load');
  const input = await readJson(request, LoadAddJobsSchema);
  return Response.json(await addJobs(user, id, input, clientAddress));
};
