import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { createDevice, listDevices } from '../../../../lib/server/services/plant-setup.ts';
import { CreateDeviceSchema } from '../../../../lib/shared/plant.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { DeviceCredentialsSchema, DeviceListSchema } from '../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'MQTT devices',
    tag: 'plant',
    action: 'plant.view',
    responses: { 200: DeviceListSchema },
  }),
  POST: operation({
    summary: 'Add a device (its password is shown once)',
    description: '`{name}` → `{id, username, password, topicPrefix}`; the password is shown this once.',
    tag: 'plant',
    action: 'admin.devices',
    body: CreateDeviceSchema,
    responses: { 201: DeviceCredentialsSchema },
    problems: [409],
  }),
};

/** Engineer/admin: devices with online/offline and last seen (never a password). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listDevices(), { headers: { 'cache-control': 'no-store' } });
};

/** Admin: `{name}` → `{id, username, password, topicPrefix}`; the password is shown this once. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const { name } = await readJson(request, contract.POST.body);
  return Response.json(await createDevice(actorOf(user, clientAddress), name), {
    status: 201,
    headers: { 'cache-control': 'no-store' },
  });
};
