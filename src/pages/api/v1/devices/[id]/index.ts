import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { updateDevice } from '../../../../../lib/server/services/plant-setup.ts';
import { UpdateDeviceSchema } from '../../../../../lib/shared/plant.ts';

/** Admin: rename, disable (`enabled: false`: the broker refuses its next connection) or re-enable a device. */
export const PATCH: APIRoute = async ({ locals, request, params, clientAddress }) => {
  const user = requireRole(locals, 'admin.devices');
  const id = idParam(params['id'], 'device');
  const input = await readJson(request, UpdateDeviceSchema);
  return Response.json(await updateDevice(actorOf(user, clientAddress), id, input));
};
