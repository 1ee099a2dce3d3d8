import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { searchJobs } from '../../../../lib/server/services/dips.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { JobSearchListSchema } from '../../../../lib/shared/api/production.ts';

const JobSearchSchema = z.object({ q: z.string().trim().min(1, { error: 'Type the start of a job number.' }).max(40) });

export const contract = {
  GET: operation({
    summary: 'Jobs by number prefix (?q)',
    tag: 'production',
    action: 'view',
    query: JobSearchSchema,
    responses: { 200: JobSearchListSchema },
  }),
};

/** Jobs whose number starts with `q` (at most 20), for search boxes. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await searchJobs(readQuery(url, contract.GET.query).q));
};
