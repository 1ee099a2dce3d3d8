import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { saveCharacteristicConfig } from '../../../../../lib/server/services/alarms.ts';
import { CharacteristicAlarmConfigSchema } from '../../../../../lib/shared/alarm-views.ts';

/** Whether a characteristic's control-chart violations raise alarms, and their priority (engineer); audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.configure');
  const body = await readJson(ctx.request, CharacteristicAlarmConfigSchema);
  const id = idParam(ctx.params['characteristicId'], 'characteristic');
  return Response.json(await saveCharacteristicConfig(user, ctx.clientAddress ?? null, id, body));
};
