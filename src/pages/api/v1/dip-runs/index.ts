import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listDipRuns, recordDipRun } from '../../../../lib/server/services/dips.ts';
import { DipRunCreateSchema, DipRunListQuerySchema } from '../../../../lib/shared/jobs.ts';

/** Dip runs, newest first (`?line&job&from&to&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  return Response.json(await listDipRuns(readQuery(url, DipRunListQuerySchema)));
};

/**
 * Record a rack dipped on a line (operator, engineer): `{lineAssetId, dippedAt?, rackCode?, jobNumbers, note?}`.
 * The server links the bath charge and last bath check at the dip time and measures the stroke's
 * mean withdrawal speed from the stored readings.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'dip.record');
  const input = await readJson(request, DipRunCreateSchema);
  return Response.json(await recordDipRun(user, input, clientAddress), { status: 201 });
};
