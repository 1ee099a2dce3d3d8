import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { applyAlarmEvent } from '../../../../../lib/server/services/alarms.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { AlarmViewSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  POST: operation({
    summary: 'Unshelve an alarm',
    tag: 'alarms',
    action: 'alarm.shelve',
    responses: { 200: AlarmViewSchema },
    problems: [409],
  }),
};

/** End a shelf early (engineer); no body. A transition the state model refuses answers 409 with its reason. */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.POST.action);
  const id = idParam(ctx.params['id'], 'alarm');
  return Response.json(await applyAlarmEvent(user, ctx.clientAddress ?? null, id, { type: 'unshelve' }));
};
