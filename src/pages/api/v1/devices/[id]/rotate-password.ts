import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { rotateDevicePassword } from '../../../../../lib/server/services/plant-setup.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { DeviceCredentialsSchema } from '../../../../../lib/shared/api/plant.ts';

export const contract = {
  POST: operation({
    summary: 'New device password (shown once)',
    tag: 'plant',
    action: 'admin.devices',
    responses: { 200: DeviceCredentialsSchema },
  }),
};

/** Admin: a new password for the device, shown this once: `{id, username, password, topicPrefix}`. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'device');
  return Response.json(await rotateDevicePassword(actorOf(user, clientAddress), id), {
    headers: { 'cache-control': 'no-store' },
  });
};
