import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createCharge, listCharges } from '../../../../lib/server/services/baths.ts';
import { BathListQuerySchema, ChargeCreateSchema } from '../../../../lib/shared/baths.ts';

/** Bath charges (which lot filled which tank when), newest first. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { tankId, limit } = readQuery(url, BathListQuerySchema);
  return Response.json(await listCharges(tankId, limit));
};

/** Record a charge: a tank filled from a lot (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'bath.configure');
  const input = await readJson(request, ChargeCreateSchema);
  return Response.json(await createCharge(user, input, clientAddress), { status: 201 });
};
