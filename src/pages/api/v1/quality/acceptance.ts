import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { getAcceptance, putAcceptance } from '../../../../lib/server/services/quality.ts';
import { AcceptanceSchema } from '../../../../lib/shared/quality.ts';

/** The lab's acceptance settings (defaults: cross-cut and boil class 0 / 5B only — common practice). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await getAcceptance());
};

/** Replace the acceptance settings (quality); recorded tests keep the settings they were judged by. */
export const PUT: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'quality.settings');
  const input = await readJson(request, AcceptanceSchema);
  return Response.json(await putAcceptance(user, input, clientAddress));
};
