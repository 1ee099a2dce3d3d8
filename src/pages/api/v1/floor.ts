import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { floorSnapshot } from '../../../lib/server/services/floor.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { FloorSnapshotSchema } from '../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'The floor overview',
    tag: 'plant',
    action: 'view',
    responses: { 200: FloorSnapshotSchema },
  }),
};

/**
 * The Floor's snapshot (every line, oven and coater with its channels, the window each is held
 * to, latest values, open alarms, device states and the load in progress). Any signed-in role.
 */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await floorSnapshot(), { headers: { 'cache-control': 'no-store' } });
};
