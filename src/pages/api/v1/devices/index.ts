import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { createDevice, listDevices } from '../../../../lib/server/services/plant-setup.ts';
import { CreateDeviceSchema } from '../../../../lib/shared/plant.ts';

/** Engineer/admin: devices with online/offline and last seen (never a password). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'plant.view');
  return Response.json(await listDevices(), { headers: { 'cache-control': 'no-store' } });
};

/** Admin: `{name}` → `{id, username, password, topicPrefix}`; the password is shown this once. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'admin.devices');
  const { name } = await readJson(request, CreateDeviceSchema);
  return Response.json(await createDevice(actorOf(user, clientAddress), name), {
    status: 201,
    headers: { 'cache-control': 'no-store' },
  });
};
