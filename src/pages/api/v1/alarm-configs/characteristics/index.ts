import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { listCharacteristicAlarmConfigs } from '../../../../../lib/server/services/alarms.ts';

/** Every control-chart characteristic with its alarm settings (null = on, at the priority raised), engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'alarm.configure');
  return Response.json(await listCharacteristicAlarmConfigs(), { headers: { 'cache-control': 'no-store' } });
};
