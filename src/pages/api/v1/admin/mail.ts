import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listCaughtMail } from '../../../../lib/server/services/accounts.ts';

/** Admin: the newest messages caught by the local fake mail relay (empty with a real relay). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'admin.mail');
  return Response.json(await listCaughtMail(), { headers: { 'cache-control': 'no-store' } });
};
