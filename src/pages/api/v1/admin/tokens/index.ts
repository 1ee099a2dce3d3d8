import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { createToken, listTokens } from '../../../../../lib/server/services/accounts.ts';
import { CreateTokenSchema } from '../../../../../lib/shared/admin.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { CreatedTokenSchema, TokenListSchema } from '../../../../../lib/shared/api/admin.ts';

export const contract = {
  GET: operation({
    summary: 'API tokens',
    tag: 'admin',
    action: 'admin.tokens',
    responses: { 200: TokenListSchema },
  }),
  POST: operation({
    summary: 'Create an API token (shown once)',
    tag: 'admin',
    action: 'admin.tokens',
    body: CreateTokenSchema,
    responses: { 201: CreatedTokenSchema },
  }),
};

/** Admin: API tokens (prefix, role, created, last used, revoked) — never their secrets. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listTokens());
};

/** Admin: a new named token with a role; `secret` is in this answer only. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createToken(actorOf(user, clientAddress), input), {
    status: 201,
    headers: { 'cache-control': 'no-store' },
  });
};
