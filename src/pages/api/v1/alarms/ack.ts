import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { bulkAck } from '../../../../lib/server/services/alarms.ts';
import { BulkAckSchema } from '../../../../lib/shared/alarms.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { BulkAckResultSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  POST: operation({
    summary: 'Acknowledge several alarms with one comment',
    tag: 'alarms',
    action: 'alarm.ack',
    body: BulkAckSchema,
    responses: { 200: BulkAckResultSchema },
  }),
};

/**
 * Acknowledge several alarms with one comment (operator, engineer). Each alarm is acknowledged
 * and audited on its own; the answer lists those acknowledged and those refused with the
 * state model's reason (e.g. "already acknowledged").
 */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.POST.action);
  const body = await readJson(ctx.request, contract.POST.body);
  return Response.json(await bulkAck(user, ctx.clientAddress ?? null, body.ids, body.comment));
};
