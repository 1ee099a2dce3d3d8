import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, readQuery } from '../../../../lib/server/http.ts';
import { windowInForce } from '../../../../lib/server/services/windows.ts';

const Query = z.object({
  assetId: z.coerce.number({ error: 'assetId must be a number.' }).int().positive('assetId must be a positive id.'),
  at: z.iso.datetime({ offset: true, error: 'at must be an ISO 8601 date-time with zone.' }).optional(),
});

/** The window in force for a line, tank, oven or zone at a time (default now). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { assetId, at } = readQuery(url, Query);
  const w = await windowInForce(assetId, at ? Date.parse(at) : Date.now());
  if (!w)
    throw new HttpProblem(
      404,
      'No window in force',
      'No process window is assigned to this asset (or its line/oven) at that time.',
    );
  return Response.json(w);
};
