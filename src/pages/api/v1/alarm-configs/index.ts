import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listChannelAlarmConfigs } from '../../../../lib/server/services/alarms.ts';

/** Every channel with its alarm settings (null = none of its own: the process window applies), engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'alarm.configure');
  return Response.json(await listChannelAlarmConfigs(), { headers: { 'cache-control': 'no-store' } });
};
