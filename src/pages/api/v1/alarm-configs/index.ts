import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listChannelAlarmConfigs } from '../../../../lib/server/services/alarms.ts';
import { pgPool } from '../../../../lib/server/db.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ChannelAlarmConfigListSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'Limit-alarm settings',
    tag: 'alarms',
    action: 'alarm.configure',
    responses: { 200: ChannelAlarmConfigListSchema },
  }),
};

/** Every channel with its alarm settings (null = none of its own: the process window applies), engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listChannelAlarmConfigs(pgPool()), { headers: { 'cache-control': 'no-store' } });
};
