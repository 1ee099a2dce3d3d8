import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { applyAlarmEvent } from '../../../../../lib/server/services/alarms.ts';
import { ShelveAlarmSchema } from '../../../../../lib/shared/alarms.ts';

/** Shelve an alarm for whole minutes with a reason (engineer). A transition the state model refuses answers 409 with its reason. */
export const POST: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.shelve');
  const body = await readJson(ctx.request, ShelveAlarmSchema);
  const id = idParam(ctx.params['id'], 'alarm');
  return Response.json(
    await applyAlarmEvent(user, ctx.clientAddress ?? null, id, { type: 'shelve', minutes: body.minutes, reason: body.reason }),
  );
};
