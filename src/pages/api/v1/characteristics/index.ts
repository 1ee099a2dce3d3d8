import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { characteristicSummaries, createCharacteristic } from '../../../../lib/server/services/spc.ts';
import { CharacteristicInputSchema } from '../../../../lib/shared/characteristics.ts';

/** Every characteristic with its limits version, point count and latest point. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await characteristicSummaries());
};

/** A new characteristic (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'characteristic.edit');
  const input = await readJson(request, CharacteristicInputSchema);
  return Response.json(await createCharacteristic(user, input, clientAddress), { status: 201 });
};
