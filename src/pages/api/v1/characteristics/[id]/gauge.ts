import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';
import { CharacteristicGaugeSchema } from '../../../../../lib/shared/msa.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { z } from 'zod';

export const contract = {
  GET: operation({
    summary: 'The gauge of a characteristic and its study status',
    tag: 'msa',
    action: 'view',
    responses: { 200: z.looseObject({}) },
    problems: [404],
  }),
  PUT: operation({
    summary: 'Set or clear the gauge of a characteristic',
    tag: 'msa',
    action: 'characteristic.edit',
    body: CharacteristicGaugeSchema,
    responses: { 200: z.looseObject({}) },
    problems: [404],
  }),
};

/** The gauge that measures a characteristic and whether it has an acceptable gauge R&R study. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await gauges.characteristicStatus(idParam(params['id'], 'characteristic')));
};

/** Set (or clear with `null`) the gauge of a characteristic (engineer): `{gaugeId}`. */
export const PUT: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.PUT.action);
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, contract.PUT.body);
  return Response.json(await gauges.linkCharacteristic(user, id, input.gaugeId, clientAddress));
};
