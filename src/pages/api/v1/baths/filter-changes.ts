import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listFilterChanges, recordFilterChange } from '../../../../lib/server/services/baths.ts';
import { BathListQuerySchema, FilterChangeSchema } from '../../../../lib/shared/baths.ts';

/** Filter changes, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { tankId, limit } = readQuery(url, BathListQuerySchema);
  return Response.json(await listFilterChanges(tankId, limit));
};

/** Log a filter change (operator, engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'bath.log');
  const input = await readJson(request, FilterChangeSchema);
  return Response.json(await recordFilterChange(user, input, clientAddress), { status: 201 });
};
