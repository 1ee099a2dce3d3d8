import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { saveCharacteristicConfig } from '../../../../../lib/server/services/alarms.ts';
import { CharacteristicAlarmConfigSchema } from '../../../../../lib/shared/alarm-views.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { CharacteristicAlarmConfigAnswerSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  PUT: operation({
    summary: 'Switch a characteristic’s control-chart alarms on or off and set their priority',
    tag: 'alarms',
    action: 'alarm.configure',
    body: CharacteristicAlarmConfigSchema,
    responses: { 200: CharacteristicAlarmConfigAnswerSchema },
  }),
};

/** Whether a characteristic's control-chart violations raise alarms, and their priority (engineer); audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.PUT.action);
  const body = await readJson(ctx.request, contract.PUT.body);
  const id = idParam(ctx.params['characteristicId'], 'characteristic');
  return Response.json(await saveCharacteristicConfig(user, ctx.clientAddress ?? null, id, body));
};
