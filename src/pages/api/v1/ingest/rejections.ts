import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { listRejections } from '../../../../lib/server/services/ingest.ts';
import { RejectionsQuerySchema } from '../../../../lib/shared/telemetry.ts';

/**
 * Refused MQTT messages, newest first (engineer): `?reason&limit&before` where `before` is the
 * id to page back from (the answer's `nextBefore`). Each item carries the raw payload and why.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'ingest.review');
  const q = readQuery(url, RejectionsQuerySchema);
  return Response.json(await listRejections(q), { headers: { 'cache-control': 'no-store' } });
};
