import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, readQuery, validate } from '../../../../../lib/server/http.ts';
import { traceJob } from '../../../../../lib/server/services/trace.ts';
import { JobNumberSchema } from '../../../../../lib/shared/jobs.ts';
import { TraceQuerySchema } from '../../../../../lib/shared/quality.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { TraceSchema } from '../../../../../lib/shared/api/quality.ts';

export const contract = {
  GET: operation({
    summary: 'Trace a job: dip runs with the bath at dip time, cure loads, alarms, tests, siblings',
    description:
      "The job's dip runs with the bath at dip time, its cure load(s) with record, verdict and the alarms during the load, its tests, and its siblings (same load; same bath charge within ± `hours`) with their test status.",
    tag: 'quality',
    action: 'view',
    params: z.object({ jobNumber: JobNumberSchema }),
    query: TraceQuerySchema,
    responses: { 200: TraceSchema },
    problems: [404],
  }),
};

/**
 * product.md §6: the job's dip runs with the bath at dip time, its cure load(s) with record,
 * verdict and the alarms during the load, its tests, and its siblings (same load; same bath
 * charge within ± `hours`, default the site setting, 8 h) with their test status.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, contract.GET.action);
  const { jobNumber } = validate(contract.GET.params, { jobNumber: params['jobNumber'] ?? '' });
  const { hours } = readQuery(url, contract.GET.query);
  const trace = await traceJob(jobNumber, hours);
  if (!trace) throw new HttpProblem(404, 'Not found', `No job ${jobNumber} is known.`);
  return Response.json(trace);
};
