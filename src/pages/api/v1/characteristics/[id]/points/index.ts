import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, readQuery } from '../../../../../../lib/server/http.ts';
import { chartData } from '../../../../../../lib/server/services/spc.ts';
import { ChartQuerySchema } from '../../../../../../lib/shared/characteristics.ts';

/**
 * The control chart's data: points (in a range, or the latest `last`), every limit set (so each
 * period is drawn against the limits in force then), the specification and the capability summary.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, 'view');
  const id = idParam(params['id'], 'characteristic');
  const q = readQuery(url, ChartQuerySchema);
  const range = {
    ...(q.from ? { fromMs: Date.parse(q.from) } : {}),
    ...(q.to ? { toMs: Date.parse(q.to) } : {}),
    ...(q.last ? { last: q.last } : {}),
  };
  return Response.json(await chartData(id, range), { headers: { 'cache-control': 'no-store' } });
};
