import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../../lib/server/http.ts';
import { discardDraft, limitSetFor } from '../../../../../../../lib/server/services/spc.ts';

/** One limit set (any status; superseded sets stay readable). */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await limitSetFor(idParam(params['id'], 'characteristic'), idParam(params['setId'], 'limit set')));
};

/** Discard a draft (engineer); approved and superseded sets cannot be deleted (409). */
export const DELETE: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, 'limits.study');
  await discardDraft(user, idParam(params['id'], 'characteristic'), idParam(params['setId'], 'limit set'), clientAddress);
  return new Response(null, { status: 204 });
};
