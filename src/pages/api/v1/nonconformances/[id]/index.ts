import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../lib/server/http.ts';
import { getNc } from '../../../../../lib/server/services/holds.ts';

/** One nonconformance: its failed tests, suspected cause, holds and signed dispositions. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  const nc = await getNc(idParam(params['id'], 'nonconformance'));
  if (!nc) throw new HttpProblem(404, 'Not found', 'No such nonconformance.');
  return Response.json(nc);
};
