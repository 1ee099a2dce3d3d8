import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listDipRuns, recordDipRun } from '../../../../lib/server/services/dips.ts';
import { DipRunCreateSchema, DipRunListQuerySchema } from '../../../../lib/shared/jobs.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { DipRunListSchema, RecordedDipRunSchema } from '../../../../lib/shared/api/production.ts';

export const contract = {
  GET: operation({
    summary: 'Dip runs (?line&job&from&to&limit)',
    tag: 'production',
    action: 'view',
    query: DipRunListQuerySchema,
    responses: { 200: DipRunListSchema },
  }),
  POST: operation({
    summary: 'Record a dip run',
    tag: 'production',
    action: 'dip.record',
    body: DipRunCreateSchema,
    responses: { 201: RecordedDipRunSchema },
  }),
};

/** Dip runs, newest first (`?line&job&from&to&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listDipRuns(readQuery(url, contract.GET.query)));
};

/**
 * Record a rack dipped on a line (operator, engineer): `{lineAssetId, dippedAt?, rackCode?, jobNumbers, note?}`.
 * The server links the bath charge and last bath check at the dip time and measures the stroke's
 * mean withdrawal speed from the stored readings.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await recordDipRun(user, input, clientAddress), { status: 201 });
};
