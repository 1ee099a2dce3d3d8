import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../lib/server/http.ts';
import { pointDetail } from '../../../../../../lib/server/services/spc.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { PointDetailSchema } from '../../../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'One chart point',
    tag: 'spc',
    action: 'view',
    responses: { 200: PointDetailSchema },
  }),
};

/** One plotted point: its subgroup's raw readings and the dip runs / oven loads it belongs to. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await pointDetail(idParam(params['id'], 'characteristic'), idParam(params['pointId'], 'point')));
};
