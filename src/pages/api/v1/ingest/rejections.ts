import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { listRejections } from '../../../../lib/server/services/ingest.ts';
import { RejectionsQuerySchema } from '../../../../lib/shared/telemetry.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { RejectionsSchema } from '../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'Refused MQTT messages with reasons',
    tag: 'plant',
    action: 'ingest.review',
    query: RejectionsQuerySchema,
    responses: { 200: RejectionsSchema },
  }),
};

/**
 * Refused MQTT messages, newest first (engineer): `?reason&limit&before` where `before` is the
 * id to page back from (the answer's `nextBefore`). Each item carries the raw payload and why.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  return Response.json(await listRejections(q), { headers: { 'cache-control': 'no-store' } });
};
