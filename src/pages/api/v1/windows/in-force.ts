import type { APIRoute } from 'astro';
import { z } from 'zod';
import { pgPool } from '../../../../lib/server/db.ts';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, readQuery } from '../../../../lib/server/http.ts';
import { windowInForce } from '../../../../lib/core/window-store.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { WindowInForceSchema } from '../../../../lib/shared/api/windows.ts';

const Query = z.object({
  assetId: z.coerce.number({ error: 'assetId must be a number.' }).int().positive('assetId must be a positive id.'),
  at: z.iso.datetime({ offset: true, error: 'at must be an ISO 8601 date-time with zone.' }).optional(),
});

export const contract = {
  GET: operation({
    summary: 'The window in force for an asset at a time',
    tag: 'windows',
    action: 'view',
    query: Query,
    responses: { 200: WindowInForceSchema },
    problems: [404],
  }),
};

/** The window in force for a line, tank, oven or zone at a time (default now). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { assetId, at } = readQuery(url, contract.GET.query);
  const w = await windowInForce(pgPool(), assetId, at ? Date.parse(at) : Date.now());
  if (!w)
    throw new HttpProblem(
      404,
      'No window in force',
      'No process window is assigned to this asset (or its line/oven) at that time.',
    );
  return Response.json(w);
};
