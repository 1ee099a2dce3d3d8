import type { APIRoute } from 'astro';
import { pgPool } from '../../../../../lib/server/db.ts';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam, readQuery } from '../../../../../lib/server/http.ts';
import { channelBrief, queryReadings } from '../../../../../lib/core/readings-store.ts';
import { ReadingsQuerySchema } from '../../../../../lib/shared/telemetry.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { ReadingsSchema } from '../../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'Readings of a channel, raw or downsampled (?from&to&maxPoints)',
    description:
      'Raw `{t, v}` points when the range holds at most `maxPoints` samples, otherwise `{t, min, max, mean, n}` buckets from the right rollup, never more than `maxPoints`. Defaults: the last hour and 1 000 points (at most 5 000). Times are epoch milliseconds.',
    tag: 'plant',
    action: 'view',
    query: ReadingsQuerySchema,
    responses: { 200: ReadingsSchema },
  }),
};

/**
 * One channel's readings (product.md §6): `?from&to&maxPoints` (ISO 8601 with zone or epoch
 * ms; default the last hour and 1 000 points, at most 5 000). Raw `{t, v}` points when the
 * range holds at most maxPoints samples, otherwise `{t, min, max, mean, n}` buckets from the
 * right rollup, never more than maxPoints. Times are epoch milliseconds.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, contract.GET.action);
  const id = idParam(params['id'], 'channel');
  const q = readQuery(url, contract.GET.query);
  const channel = await channelBrief(pgPool(), id);
  if (!channel) throw new HttpProblem(404, 'Not found', 'No such channel.');
  return Response.json(await queryReadings(pgPool(), channel, q), { headers: { 'cache-control': 'no-store' } });
};
