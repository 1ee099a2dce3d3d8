import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { revokeToken } from '../../../../../../lib/server/services/accounts.ts';

/** Admin: revoke a token; it answers 401 from then on. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, 'admin.tokens');
  const id = idParam(params['id'], 'API token');
  return Response.json(await revokeToken(actorOf(user, clientAddress), id));
};
