import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { floorSnapshot } from '../../../lib/server/services/floor.ts';

/**
 * The Floor's snapshot (every line, oven and coater with its channels, the window each is held
 * to, latest values, open alarms, device states and the load in progress). Any signed-in role.
 */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await floorSnapshot(), { headers: { 'cache-control': 'no-store' } });
};
