import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listChecks, recordCheck } from '../../../../lib/server/services/baths.ts';
import { BathCheckInputSchema, BathListQuerySchema } from '../../../../lib/shared/baths.ts';

/** Bath checks, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { tankId, limit } = readQuery(url, BathListQuerySchema);
  return Response.json(await listChecks(tankId, limit));
};

/**
 * Log a bath check (operator, engineer): cup + efflux seconds or a measured viscosity. The
 * server computes the viscosity itself and stores it with the check; an efflux time outside
 * the cup's window is refused ("out of range — use another cup").
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'bath.log');
  const input = await readJson(request, BathCheckInputSchema);
  return Response.json(await recordCheck(user, input, clientAddress), { status: 201 });
};
