import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { getCharacteristic, updateCharacteristic } from '../../../../../lib/server/services/spc.ts';
import { CharacteristicInputSchema } from '../../../../../lib/shared/characteristics.ts';

/** One characteristic. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await getCharacteristic(idParam(params['id'], 'characteristic')));
};

/**
 * Replace a characteristic's settings (engineer). Chart type, subgroup size and rule and the
 * source channels are fixed once the chart holds points (409).
 */
export const PUT: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'characteristic.edit');
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, CharacteristicInputSchema);
  return Response.json(await updateCharacteristic(user, id, input, clientAddress));
};
