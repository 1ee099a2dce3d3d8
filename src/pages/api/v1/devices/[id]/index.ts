import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { updateDevice } from '../../../../../lib/server/services/plant-setup.ts';
import { UpdateDeviceSchema } from '../../../../../lib/shared/plant.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { UpdatedDeviceSchema } from '../../../../../lib/shared/api/plant.ts';

export const contract = {
  PATCH: operation({
    summary: 'Change a device',
    tag: 'plant',
    action: 'admin.devices',
    body: UpdateDeviceSchema,
    responses: { 200: UpdatedDeviceSchema },
    problems: [409],
  }),
};

/** Admin: rename, disable (`enabled: false`: the broker refuses its next connection) or re-enable a device. */
export const PATCH: APIRoute = async ({ locals, request, params, clientAddress }) => {
  const user = requireRole(locals, contract.PATCH.action);
  const id = idParam(params['id'], 'device');
  const input = await readJson(request, contract.PATCH.body);
  return Response.json(await updateDevice(actorOf(user, clientAddress), id, input));
};
