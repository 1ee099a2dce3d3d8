import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';
import { CharacteristicGaugeSchema } from '../../../../../lib/shared/msa.ts';

/** The gauge that measures a characteristic and whether it has an acceptable gauge R&R study. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await gauges.characteristicStatus(idParam(params['id'], 'characteristic')));
};

/** Set (or clear with `null`) the gauge of a characteristic (engineer): `{gaugeId}`. */
export const PUT: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'characteristic.edit');
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, CharacteristicGaugeSchema);
  return Response.json(await gauges.linkCharacteristic(user, id, input.gaugeId, clientAddress));
};
