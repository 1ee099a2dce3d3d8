import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { createToken, listTokens } from '../../../../../lib/server/services/accounts.ts';
import { CreateTokenSchema } from '../../../../../lib/shared/admin.ts';

/** Admin: API tokens (prefix, role, created, last used, revoked) — never their secrets. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'admin.tokens');
  return Response.json(await listTokens());
};

/** Admin: a new named token with a role; `secret` is in this answer only. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'admin.tokens');
  const input = await readJson(request, CreateTokenSchema);
  return Response.json(await createToken(actorOf(user, clientAddress), input), {
    status: 201,
    headers: { 'cache-control': 'no-store' },
  });
};
