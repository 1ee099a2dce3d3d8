import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { holdsCsv, listHolds, placeHolds } from '../../../../lib/server/services/holds.ts';
import { HoldListQuerySchema, HoldPlaceSchema } from '../../../../lib/shared/quality.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { HoldListSchema, PlacedHoldsSchema } from '../../../../lib/shared/api/quality.ts';

export const contract = {
  GET: operation({
    summary: 'Holds (?status=active|closed|all&job; format=csv)',
    tag: 'quality',
    action: 'view',
    query: HoldListQuerySchema,
    responses: { 200: { json: HoldListSchema, csv: true } },
  }),
  POST: operation({
    summary: 'Place jobs on hold',
    tag: 'quality',
    action: 'hold.place',
    body: HoldPlaceSchema,
    responses: { 201: PlacedHoldsSchema },
  }),
};

/** Holds (`?status=active|closed|all&job`; `format=csv`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const items = await listHolds(q);
  if (q.format === 'csv') {
    return new Response(await holdsCsv(items), {
      headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="holds.csv"' },
    });
  }
  return Response.json(items);
};

/** Hold jobs (quality): `{jobNumbers, reason, ncId?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await placeHolds(user, input, clientAddress), { status: 201 });
};
