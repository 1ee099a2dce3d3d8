import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { readQuery } from '../../../../../lib/server/http.ts';
import { listUnknownChannels } from '../../../../../lib/server/services/ingest.ts';
import { UnknownChannelsQuerySchema } from '../../../../../lib/shared/telemetry.ts';

/**
 * Topics a known device published on that no channel matches (engineer): open ones first;
 * `?resolved=1` includes those already approved. Approve with
 * `POST /api/v1/ingest/unknown-channels/{id}/approve`.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'ingest.review');
  const q = readQuery(url, UnknownChannelsQuerySchema);
  return Response.json({ items: await listUnknownChannels(q.resolved === '1') }, { headers: { 'cache-control': 'no-store' } });
};
