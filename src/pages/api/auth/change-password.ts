import type { APIRoute } from 'astro';
import { operation } from '../../../lib/server/api-operation.ts';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { changeOwnPassword } from '../../../lib/server/services/accounts.ts';
import { ChangePasswordSchema } from '../../../lib/shared/admin.ts';

export const contract = {
  POST: operation({
    summary: 'Change your own password (also while it must be changed)',
    tag: 'auth',
    action: 'view',
    body: ChangePasswordSchema,
    responses: { 204: null },
    problems: [429],
  }),
};

/**
 * Any signed-in person: `{"currentPassword","newPassword"}` → 204. Open also while the account
 * must change its password (the only route that is, beside sign-out); a wrong current password
 * → 403, throttled like a signature.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  await changeOwnPassword(user, locals.session?.id ?? null, input, clientAddress);
  return new Response(null, { status: 204 });
};
