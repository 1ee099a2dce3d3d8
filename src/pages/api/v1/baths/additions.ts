import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listAdditions, recordAddition } from '../../../../lib/server/services/baths.ts';
import { BathAdditionEntrySchema, BathListQuerySchema } from '../../../../lib/shared/baths.ts';

/** Solvent and fresh-lacquer additions, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { tankId, limit } = readQuery(url, BathListQuerySchema);
  return Response.json(await listAdditions(tankId, limit));
};

/** Log an addition (operator, engineer); `checkId` links the check whose recommendation was followed. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'bath.log');
  const input = await readJson(request, BathAdditionEntrySchema);
  return Response.json(await recordAddition(user, input, clientAddress), { status: 201 });
};
