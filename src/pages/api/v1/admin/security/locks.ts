import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { listLocks } from '../../../../../lib/server/services/accounts.ts';

/** Admin: sign-in locks and recent failure counts per user and per address. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'admin.security');
  return Response.json(await listLocks());
};
