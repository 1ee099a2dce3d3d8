import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listLoads, loadsCsv, openLoadByHand } from '../../../../lib/server/services/loads.ts';
import { LoadListQuerySchema, LoadOpenSchema } from '../../../../lib/shared/jobs.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { LoadDetailSchema, LoadListSchema } from '../../../../lib/shared/api/production.ts';

export const contract = {
  GET: operation({
    summary: 'Oven loads (?oven&status&verdict&from&to&job&limit; format=csv)',
    tag: 'production',
    action: 'view',
    query: LoadListQuerySchema,
    responses: { 200: { json: LoadListSchema, csv: true } },
  }),
  POST: operation({
    summary: 'Open an oven load by hand',
    tag: 'production',
    action: 'load.manage',
    body: LoadOpenSchema,
    responses: { 201: LoadDetailSchema },
    problems: [409],
  }),
};

/** Oven loads, newest first (`?oven&status&verdict&from&to&job&limit`; `format=csv` for a spreadsheet). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const items = await listLoads(q);
  if (q.format === 'csv') {
    return new Response(await loadsCsv(items), {
      headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="oven-loads.csv"' },
    });
  }
  return Response.json(items);
};

/** Open a load by hand (operator, engineer); the ingest worker opens loads itself at cycle start. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await openLoadByHand(user, input, clientAddress), { status: 201 });
};
