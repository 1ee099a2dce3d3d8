import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listLoads, loadsCsv, openLoadByHand } from '../../../../lib/server/services/loads.ts';
import { LoadListQuerySchema, LoadOpenSchema } from '../../../../lib/shared/jobs.ts';

/** Oven loads, newest first (`?oven&status&verdict&from&to&job&limit`; `format=csv` for a spreadsheet). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, LoadListQuerySchema);
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
  const user = requireRole(locals, 'load.manage');
  const input = await readJson(request, LoadOpenSchema);
  return Response.json(await openLoadByHand(user, input, clientAddress), { status: 201 });
};
