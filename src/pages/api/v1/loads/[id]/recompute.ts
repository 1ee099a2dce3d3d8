import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { recompute } from '../../../../../lib/server/services/loads.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { RecomputeResultSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  POST: operation({
    summary: 'Recompute a closed load’s cure record',
    tag: 'production',
    action: 'load.recompute',
    responses: { 200: RecomputeResultSchema },
    problems: [409],
  }),
};

/** Recompute a closed load's cure record from the stored readings (engineer, quality); audited. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'oven load');
  return Response.json(await recompute(user, id, clientAddress));
};
