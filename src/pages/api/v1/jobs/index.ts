import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { searchJobs } from '../../../../lib/server/services/dips.ts';

const JobSearchSchema = z.object({ q: z.string().trim().min(1, { error: 'Type the start of a job number.' }).max(40) });

/** Jobs whose number starts with `q` (at most 20), for search boxes. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  return Response.json(await searchJobs(readQuery(url, JobSearchSchema).q));
};
