import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { applyAlarmEvent } from '../../../../../lib/server/services/alarms.ts';
import { AckAlarmSchema } from '../../../../../lib/shared/alarms.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { AlarmViewSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  POST: operation({
    summary: 'Acknowledge an alarm with a comment',
    tag: 'alarms',
    action: 'alarm.ack',
    body: AckAlarmSchema,
    responses: { 200: AlarmViewSchema },
    problems: [409],
  }),
};

/** Acknowledge an alarm with a comment (operator, engineer; ANSI/ISA-18.2 acknowledgement). A transition the state model refuses answers 409 with its reason. */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.POST.action);
  const body = await readJson(ctx.request, contract.POST.body);
  const id = idParam(ctx.params['id'], 'alarm');
  return Response.json(await applyAlarmEvent(user, ctx.clientAddress ?? null, id, { type: 'ack', comment: body.comment }));
};
