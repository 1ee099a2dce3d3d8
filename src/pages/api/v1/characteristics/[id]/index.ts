import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { getCharacteristic, updateCharacteristic } from '../../../../../lib/server/services/spc.ts';
import { CharacteristicInputSchema } from '../../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { CharacteristicSchema, UpdatedCharacteristicSchema } from '../../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'One characteristic',
    tag: 'spc',
    action: 'view',
    responses: { 200: CharacteristicSchema },
  }),
  PUT: operation({
    summary: 'Change a characteristic',
    tag: 'spc',
    action: 'characteristic.edit',
    body: CharacteristicInputSchema,
    responses: { 200: UpdatedCharacteristicSchema },
    problems: [409],
  }),
};

/** One characteristic. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await getCharacteristic(idParam(params['id'], 'characteristic')));
};

/**
 * Replace a characteristic's settings (engineer). Chart type, subgroup size and rule and the
 * source channels are fixed once the chart holds points (409).
 */
export const PUT: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.PUT.action);
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, contract.PUT.body);
  return Response.json(await updateCharacteristic(user, id, input, clientAddress));
};
