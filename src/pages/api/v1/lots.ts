import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createLot, listLots } from '../../../lib/server/services/baths.ts';
import { LotCreateSchema } from '../../../lib/shared/baths.ts';

/** Lacquer lots received (maker's lot, received, expiry, solids %). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await listLots());
};

/** Record a received lot (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'bath.configure');
  const input = await readJson(request, LotCreateSchema);
  return Response.json(await createLot(user, input, clientAddress), { status: 201 });
};
