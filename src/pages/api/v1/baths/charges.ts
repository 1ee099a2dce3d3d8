import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createCharge, listCharges } from '../../../../lib/server/services/baths.ts';
import { BathListQuerySchema, ChargeCreateSchema } from '../../../../lib/shared/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ChargeListSchema, ChargeSchema } from '../../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Bath charges',
    tag: 'baths',
    action: 'view',
    query: BathListQuerySchema,
    responses: { 200: ChargeListSchema },
  }),
  POST: operation({
    summary: 'Record a charge (a tank filled from a lot)',
    tag: 'baths',
    action: 'bath.configure',
    body: ChargeCreateSchema,
    responses: { 201: ChargeSchema },
  }),
};

/** Bath charges (which lot filled which tank when), newest first. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { tankId, limit } = readQuery(url, contract.GET.query);
  return Response.json(await listCharges(tankId, limit));
};

/** Record a charge: a tank filled from a lot (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createCharge(user, input, clientAddress), { status: 201 });
};
