import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { createUser, listUsers } from '../../../../../lib/server/services/accounts.ts';
import { CreateUserSchema } from '../../../../../lib/shared/admin.ts';

/** Admin: every user, active first, with last sign-in and live session count. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'admin.users');
  return Response.json(await listUsers());
};

/** Admin: create a user with a role and e-mail; without a password the person is e-mailed a link. */
export const POST: APIRoute = async ({ locals, request, clientAddress, url }) => {
  const user = requireRole(locals, 'admin.users');
  const input = await readJson(request, CreateUserSchema);
  const created = await createUser(actorOf(user, clientAddress), input, url.origin);
  return Response.json(created, { status: 201 });
};
