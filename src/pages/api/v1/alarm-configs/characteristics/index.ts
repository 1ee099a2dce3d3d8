import type { APIRoute } from 'astro';
import { pgPool } from '../../../../../lib/server/db.ts';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { listCharacteristicAlarmConfigs } from '../../../../../lib/server/services/alarms.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { CharacteristicAlarmConfigListSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'Control-chart alarm settings per characteristic',
    tag: 'alarms',
    action: 'alarm.configure',
    responses: { 200: CharacteristicAlarmConfigListSchema },
  }),
};

/** Every control-chart characteristic with its alarm settings (null = on, at the priority raised), engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listCharacteristicAlarmConfigs(pgPool()), { headers: { 'cache-control': 'no-store' } });
};
