import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listBaths } from '../../../../lib/server/services/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { BathListSchema } from '../../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Hard-coat baths: charge, age, pot life, window, last check, additions',
    tag: 'baths',
    action: 'view',
    responses: { 200: BathListSchema },
  }),
};

/** Hard-coat tanks with their charge, age and pot-life state, window, last check and recent additions. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listBaths());
};
