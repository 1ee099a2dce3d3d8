import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../lib/server/guard.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { db } from '../../../../lib/server/db.ts';
import { lastAuditVerification, runAuditVerification } from '../../../../lib/core/audit-chain.ts';
import { AuditChainStatusSchema } from '../../../../lib/shared/api/audit-chain.ts';

export const contract = {
  GET: operation({
    summary: 'The latest verification of the audit hash chain',
    tag: 'admin',
    action: 'admin.security',
    responses: { 200: AuditChainStatusSchema },
  }),
  POST: operation({
    summary: 'Verify the audit hash chain now (walks every row; names the first broken link)',
    tag: 'admin',
    action: 'admin.security',
    responses: { 200: AuditChainStatusSchema },
  }),
};

/** Admin: the outcome of the last verification run (CLI `npm run audit:verify` or this screen). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  db();
  return Response.json({ last: await lastAuditVerification() });
};

/** Admin: walk the chain now; the outcome is kept and answered. */
export const POST: APIRoute = async ({ locals, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const { record } = await runAuditVerification(db(), actorOf(user, clientAddress).label);
  return Response.json({ last: record });
};
