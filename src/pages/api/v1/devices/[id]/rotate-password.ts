import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { rotateDevicePassword } from '../../../../../lib/server/services/plant-setup.ts';

/** Admin: a new password for the device, shown this once: `{id, username, password, topicPrefix}`. */
export const POST: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, 'admin.devices');
  const id = idParam(params['id'], 'device');
  return Response.json(await rotateDevicePassword(actorOf(user, clientAddress), id), {
    headers: { 'cache-control': 'no-store' },
  });
};
