import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { readQuery } from '../../../../../lib/server/http.ts';
import { listUnknownChannels } from '../../../../../lib/server/services/ingest.ts';
import { UnknownChannelsQuerySchema } from '../../../../../lib/shared/telemetry.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { UnknownChannelListSchema } from '../../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'Topics that name no channel',
    tag: 'plant',
    action: 'ingest.review',
    query: UnknownChannelsQuerySchema,
    responses: { 200: UnknownChannelListSchema },
  }),
};

/**
 * Topics a known device published on that no channel matches (engineer): open ones first;
 * `?resolved=1` includes those already approved. Approve with
 * `POST /api/v1/ingest/unknown-channels/{id}/approve`.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  return Response.json({ items: await listUnknownChannels(q.resolved === '1') }, { headers: { 'cache-control': 'no-store' } });
};
