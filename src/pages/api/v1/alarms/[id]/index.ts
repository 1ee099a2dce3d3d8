import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { alarmWithEvents } from '../../../../../lib/server/services/alarms.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { AlarmWithEventsSchema } from '../../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'One alarm with its history',
    tag: 'alarms',
    action: 'view',
    responses: { 200: AlarmWithEventsSchema },
  }),
};

/** One alarm with every transition (who, when, comment), any signed-in role. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await alarmWithEvents(idParam(params['id'], 'alarm')), { headers: { 'cache-control': 'no-store' } });
};
