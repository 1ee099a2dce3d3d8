import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../../lib/server/http.ts';
import { updateUser } from '../../../../../../lib/server/services/accounts.ts';
import { UpdateUserSchema } from '../../../../../../lib/shared/admin.ts';

/**
 * Admin: change name, e-mail or role, deactivate (`active: false`, ends the user's sessions)
 * or reactivate. Users are never deleted: records keep their author.
 */
export const PATCH: APIRoute = async ({ locals, request, params, clientAddress }) => {
  const user = requireRole(locals, 'admin.users');
  const id = idParam(params['id'], 'user');
  const input = await readJson(request, UpdateUserSchema);
  return Response.json(await updateUser(actorOf(user, clientAddress), id, input));
};
