import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { holdsCsv, listHolds, placeHolds } from '../../../../lib/server/services/holds.ts';
import { HoldListQuerySchema, HoldPlaceSchema } from '../../../../lib/shared/quality.ts';

/** Holds (`?status=active|closed|all&job`; `format=csv`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, HoldListQuerySchema);
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
  const user = requireRole(locals, 'hold.place');
  const input = await readJson(request, HoldPlaceSchema);
  return Response.json(await placeHolds(user, input, clientAddress), { status: 201 });
};
