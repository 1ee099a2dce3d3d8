import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam, readQuery } from '../../../../../lib/server/http.ts';
import { channelAnnotations } from '../../../../../lib/server/services/trend.ts';
import { AnnotationsQuerySchema } from '../../../../../lib/shared/trend-query.ts';

/**
 * What a channel's trend draws besides its readings, over `?from&to` (epoch ms; default the
 * last hour; at most 2 years): the process window in force as stretches, and the alarms, bath
 * additions, filter changes, door openings and load starts/ends near the channel.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, 'view');
  const id = idParam(params['id'], 'channel');
  const q = readQuery(url, AnnotationsQuerySchema);
  const out = await channelAnnotations(id, q.from, q.to);
  if (!out) throw new HttpProblem(404, 'Not found', 'No such channel.');
  return Response.json(out, { headers: { 'cache-control': 'no-store' } });
};
