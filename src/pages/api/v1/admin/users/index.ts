import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { createUser, listUsers } from '../../../../../lib/server/services/accounts.ts';
import { CreateUserSchema } from '../../../../../lib/shared/admin.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { CreatedUserSchema, UserListSchema } from '../../../../../lib/shared/api/admin.ts';

export const contract = {
  GET: operation({
    summary: 'Users',
    tag: 'admin',
    action: 'admin.users',
    responses: { 200: UserListSchema },
  }),
  POST: operation({
    summary: 'Create a user',
    tag: 'admin',
    action: 'admin.users',
    body: CreateUserSchema,
    responses: { 201: CreatedUserSchema },
    problems: [409],
  }),
};

/** Admin: every user, active first, with last sign-in and live session count. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listUsers());
};

/** Admin: create a user with a role and e-mail; without a password the person is e-mailed a link. */
export const POST: APIRoute = async ({ locals, request, clientAddress, url }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  const created = await createUser(actorOf(user, clientAddress), input, url.origin);
  return Response.json(created, { status: 201 });
};
