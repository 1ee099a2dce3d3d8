import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../lib/server/http.ts';
import { listSurveys } from '../../../../lib/server/services/surveys.ts';

/** One survey. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  const [s] = await listSurveys(undefined, idParam(params['id'], 'survey'));
  if (!s) throw new HttpProblem(404, 'Not found', 'No such survey.');
  return Response.json(s);
};
