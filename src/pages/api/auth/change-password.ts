import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { changeOwnPassword } from '../../../lib/server/services/accounts.ts';
import { ChangePasswordSchema } from '../../../lib/shared/admin.ts';

/**
 * Any signed-in person: `{"currentPassword","newPassword"}` → 204. Open also while the account
 * must change its password (the only route that is, beside sign-out); a wrong current password
 * → 403, throttled like a signature.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'view');
  const input = await readJson(request, ChangePasswordSchema);
  await changeOwnPassword(user, locals.session?.id ?? null, input, clientAddress);
  return new Response(null, { status: 204 });
};
