import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { closeLoadByHand } from '../../../../../lib/server/services/loads.ts';
import { LoadCloseSchema } from '../../../../../lib/shared/jobs.ts';

/** Close an open load by hand (operator, engineer); the cure record is computed at once. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'load.manage');
  const id = idParam(params['id'], 'oven load');
  const input = await readJson(request, LoadCloseSchema);
  return Response.json(await closeLoadByHand(user, id, input, clientAddress));
};
