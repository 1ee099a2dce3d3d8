import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam, readQuery } from '../../../../../lib/server/http.ts';
import { channelAnnotations } from '../../../../../lib/server/services/trend.ts';
import { AnnotationsQuerySchema } from '../../../../../lib/shared/trend-query.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { AnnotationsSchema } from '../../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'Events to mark on a channel’s chart',
    tag: 'plant',
    action: 'view',
    query: AnnotationsQuerySchema,
    responses: { 200: AnnotationsSchema },
  }),
};

/**
 * What a channel's trend draws besides its readings, over `?from&to` (epoch ms; default the
 * last hour; at most 2 years): the process window in force as stretches, and the alarms, bath
 * additions, filter changes, door openings and load starts/ends near the channel.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, contract.GET.action);
  const id = idParam(params['id'], 'channel');
  const q = readQuery(url, contract.GET.query);
  const out = await channelAnnotations(id, q.from, q.to);
  if (!out) throw new HttpProblem(404, 'Not found', 'No such channel.');
  return Response.json(out, { headers: { 'cache-control': 'no-store' } });
};
