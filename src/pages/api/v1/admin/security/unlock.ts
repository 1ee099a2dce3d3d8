import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { unlock } from '../../../../../lib/server/services/accounts.ts';
import { UnlockSchema } from '../../../../../lib/shared/admin.ts';

/** Admin: lift a sign-in lock `{key}` (e.g. "user:jo" or "ip:10.0.0.7"); audited. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'admin.security');
  const { key } = await readJson(request, UnlockSchema);
  await unlock(actorOf(user, clientAddress), key);
  return Response.json({ unlocked: key });
};
