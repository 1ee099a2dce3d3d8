import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { adminSendReset } from '../../../../../../lib/server/services/accounts.ts';

/** Admin: e-mail the user a one-time link (30 minutes) to set a new password. */
export const POST: APIRoute = async ({ locals, params, clientAddress, url }) => {
  const user = requireRole(locals, 'admin.users');
  const id = idParam(params['id'], 'user');
  const sent = await adminSendReset(actorOf(user, clientAddress), id, url.origin);
  return Response.json({ sent: true, ...sent }, { status: 202 });
};
