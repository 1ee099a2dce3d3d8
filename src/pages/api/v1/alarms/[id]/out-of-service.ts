import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { applyAlarmEvent } from '../../../../../lib/server/services/alarms.ts';
import { OutOfServiceSchema } from '../../../../../lib/shared/alarms.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { AlarmViewSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  POST: operation({
    summary: 'Take an alarm out of service',
    tag: 'alarms',
    action: 'alarm.configure',
    body: OutOfServiceSchema,
    responses: { 200: AlarmViewSchema },
    problems: [409],
  }),
};

/** Take an alarm out of service with a reason, e.g. a thermocouple being replaced (engineer). A transition the state model refuses answers 409 with its reason. */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.POST.action);
  const body = await readJson(ctx.request, contract.POST.body);
  const id = idParam(ctx.params['id'], 'alarm');
  return Response.json(
    await applyAlarmEvent(user, ctx.clientAddress ?? null, id, { type: 'remove-from-service', reason: body.reason }),
  );
};
