import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { applyAlarmEvent } from '../../../../../lib/server/services/alarms.ts';
import { OutOfServiceSchema } from '../../../../../lib/shared/alarms.ts';

/** Take an alarm out of service with a reason, e.g. a thermocouple being replaced (engineer). A transition the state model refuses answers 409 with its reason. */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.configure');
  const body = await readJson(ctx.request, OutOfServiceSchema);
  const id = idParam(ctx.params['id'], 'alarm');
  return Response.json(
    await applyAlarmEvent(user, ctx.clientAddress ?? null, id, { type: 'remove-from-service', reason: body.reason }),
  );
};
