import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { adminSendReset } from '../../../../../../lib/server/services/accounts.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { ResetLinkSentSchema } from '../../../../../../lib/shared/api/admin.ts';

export const contract = {
  POST: operation({
    summary: 'Send a user a password-reset link',
    tag: 'admin',
    action: 'admin.users',
    responses: { 202: ResetLinkSentSchema },
    problems: [400, 409],
  }),
};

/** Admin: e-mail the user a one-time link (30 minutes) to set a new password. */
export const POST: APIRoute = async ({ locals, params, clientAddress, url }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'user');
  const sent = await adminSendReset(actorOf(user, clientAddress), id, url.origin);
  return Response.json({ sent: true, ...sent }, { status: 202 });
};
