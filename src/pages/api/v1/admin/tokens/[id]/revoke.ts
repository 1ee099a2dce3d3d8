import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { revokeToken } from '../../../../../../lib/server/services/accounts.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { TokenViewSchema } from '../../../../../../lib/shared/api/admin.ts';

export const contract = {
  POST: operation({
    summary: 'Revoke an API token',
    tag: 'admin',
    action: 'admin.tokens',
    responses: { 200: TokenViewSchema },
    problems: [409],
  }),
};

/** Admin: revoke a token; it answers 401 from then on. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'API token');
  return Response.json(await revokeToken(actorOf(user, clientAddress), id));
};
