import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../../lib/server/http.ts';
import { updateUser } from '../../../../../../lib/server/services/accounts.ts';
import { UpdateUserSchema } from '../../../../../../lib/shared/admin.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { UserViewSchema } from '../../../../../../lib/shared/api/admin.ts';

export const contract = {
  PATCH: operation({
    summary: 'Change a user (role, name, active)',
    tag: 'admin',
    action: 'admin.users',
    body: UpdateUserSchema,
    responses: { 200: UserViewSchema },
    problems: [409],
  }),
};

/**
 * Admin: change name, e-mail or role, deactivate (`active: false`, ends the user's sessions)
 * or reactivate. Users are never deleted: records keep their author.
 */
export const PATCH: APIRoute = async ({ locals, request, params, clientAddress }) => {
  const user = requireRole(locals, contract.PATCH.action);
  const id = idParam(params['id'], 'user');
  const input = await readJson(request, contract.PATCH.body);
  return Response.json(await updateUser(actorOf(user, clientAddress), id, input));
};
