import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, readQuery } from '../../../../../../lib/server/http.ts';
import { chartData } from '../../../../../../lib/server/services/spc.ts';
import { ChartQuerySchema } from '../../../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { ChartDataSchema } from '../../../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'Chart points',
    tag: 'spc',
    action: 'view',
    query: ChartQuerySchema,
    responses: { 200: ChartDataSchema },
  }),
};

/**
 * The control chart's data: points (in a range, or the latest `last`), every limit set (so each
 * period is drawn against the limits in force then), the specification and the capability summary.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, contract.GET.action);
  const id = idParam(params['id'], 'characteristic');
  const q = readQuery(url, contract.GET.query);
  const range = {
    ...(q.from ? { fromMs: Date.parse(q.from) } : {}),
    ...(q.to ? { toMs: Date.parse(q.to) } : {}),
    ...(q.last ? { last: q.last } : {}),
  };
  return Response.json(await chartData(id, range), { headers: { 'cache-control': 'no-store' } });
};
