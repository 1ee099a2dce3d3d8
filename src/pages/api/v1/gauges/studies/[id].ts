import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';

/** One study with its readings and computed result. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await gauges.study(idParam(params['id'], 'gauge study')));
};
