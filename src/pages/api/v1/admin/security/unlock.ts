import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { readJson } from '../../../../../lib/server/http.ts';
import { unlock } from '../../../../../lib/server/services/accounts.ts';
import { UnlockSchema } from '../../../../../lib/shared/admin.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { UnlockedSchema } from '../../../../../lib/shared/api/admin.ts';

export const contract = {
  POST: operation({
    summary: 'Lift a sign-in lock-out',
    tag: 'admin',
    action: 'admin.security',
    body: UnlockSchema,
    responses: { 200: UnlockedSchema },
    problems: [404],
  }),
};

/** Admin: lift a sign-in lock `{key}` (e.g. "user:jo" or "ip:10.0.0.7"); audited. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const { key } = await readJson(request, contract.POST.body);
  await unlock(actorOf(user, clientAddress), key);
  return Response.json({ unlocked: key });
};
