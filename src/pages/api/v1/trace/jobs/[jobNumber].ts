import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, readQuery, validate } from '../../../../../lib/server/http.ts';
import { traceJob } from '../../../../../lib/server/services/trace.ts';
import { JobNumberSchema } from '../../../../../lib/shared/jobs.ts';
import { TraceQuerySchema } from '../../../../../lib/shared/quality.ts';

/**
 * product.md §6: the job's dip runs with the bath at dip time, its cure load(s) with record,
 * verdict and the alarms during the load, its tests, and its siblings (same load; same bath
 * charge within ± `hours`, default the site setting, 8 h) with their test status.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, 'view');
  const jobNumber = validate(JobNumberSchema, params['jobNumber'] ?? '');
  const { hours } = readQuery(url, TraceQuerySchema);
  const trace = await traceJob(jobNumber, hours);
  if (!trace) throw new HttpProblem(404, 'Not found', `No job ${jobNumber} is known.`);
  return Response.json(trace);
};
