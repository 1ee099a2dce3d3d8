import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listCaughtMail } from '../../../../lib/server/services/accounts.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { MailListSchema } from '../../../../lib/shared/api/admin.ts';

export const contract = {
  GET: operation({
    summary: 'Outgoing mail log',
    tag: 'admin',
    action: 'admin.mail',
    responses: { 200: MailListSchema },
  }),
};

/** Admin: the newest messages caught by the local fake mail relay (empty with a real relay). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listCaughtMail(), { headers: { 'cache-control': 'no-store' } });
};
