import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { recompute } from '../../../../../lib/server/services/loads.ts';

/** Recompute a closed load's cure record from the stored readings (engineer, quality); audited. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, 'load.recompute');
  const id = idParam(params['id'], 'oven load');
  return Response.json(await recompute(user, id, clientAddress));
};
