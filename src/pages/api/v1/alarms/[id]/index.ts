import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { alarmWithEvents } from '../../../../../lib/server/services/alarms.ts';

/** One alarm with every transition (who, when, comment), any signed-in role. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await alarmWithEvents(idParam(params['id'], 'alarm')), { headers: { 'cache-control': 'no-store' } });
};
