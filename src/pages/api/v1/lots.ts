import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createLot, listLots } from '../../../lib/server/services/baths.ts';
import { LotCreateSchema } from '../../../lib/shared/baths.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { LotListSchema, LotSchema } from '../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Lacquer lots',
    tag: 'baths',
    action: 'view',
    responses: { 200: LotListSchema },
  }),
  POST: operation({
    summary: 'Record a received lot',
    tag: 'baths',
    action: 'bath.configure',
    body: LotCreateSchema,
    responses: { 201: LotSchema },
    problems: [409],
  }),
};

/** Lacquer lots received (maker's lot, received, expiry, solids %). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listLots());
};

/** Record a received lot (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createLot(user, input, clientAddress), { status: 201 });
};
