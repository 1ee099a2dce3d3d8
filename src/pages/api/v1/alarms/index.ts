import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { alarmsList } from '../../../../lib/server/services/alarms.ts';
import { AlarmListQuerySchema } from '../../../../lib/shared/alarm-views.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AlarmListSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'Alarms (?state=ISA state names or open, ?priority=, ?limit=)',
    description:
      '`?state=` comma-separated states (normal, unacked, acked, rtn-unacked, shelved, suppressed, out-of-service) or `open`; `?priority=`; `?channel=`; `?limit=` (1–500, default 200). Waiting for acknowledgement first, then priority, then newest.',
    tag: 'alarms',
    action: 'view',
    query: AlarmListQuerySchema,
    responses: { 200: AlarmListSchema },
  }),
};

/**
 * The alarm list (product.md §6), any signed-in role: `?state=` comma-separated ISA-18.2 state
 * names of the domain (normal, unacked, acked, rtn-unacked, shelved, suppressed,
 * out-of-service) or `open` (the annunciated states), `?priority=high,medium`, `?channel=`,
 * `?limit=` (1–500, default 200). Waiting for acknowledgement first, then priority, then newest.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const alarms = await alarmsList({
    states: q.state,
    priorities: q.priority,
    ...(q.channel !== undefined ? { channelId: q.channel } : {}),
    limit: q.limit,
  });
  return Response.json(alarms, { headers: { 'cache-control': 'no-store' } });
};
