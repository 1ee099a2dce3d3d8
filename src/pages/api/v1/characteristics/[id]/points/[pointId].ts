import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { pointDetail } from '../../../../../../lib/server/services/spc.ts';

/** One plotted point: its subgroup's raw readings and the dip runs / oven loads it belongs to. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await pointDetail(idParam(params['id'], 'characteristic'), idParam(params['pointId'], 'point')));
};
