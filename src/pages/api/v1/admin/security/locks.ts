import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { listLocks } from '../../../../../lib/server/services/accounts.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { LockListSchema } from '../../../../../lib/shared/api/admin.ts';

export const contract = {
  GET: operation({
    summary: 'Sign-in lock-outs',
    tag: 'admin',
    action: 'admin.security',
    responses: { 200: LockListSchema },
  }),
};

/** Admin: sign-in locks and recent failure counts per user and per address. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listLocks());
};
