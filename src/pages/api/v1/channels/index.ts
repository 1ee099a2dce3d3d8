import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { channelViews, createChannel } from '../../../../lib/server/services/plant-setup.ts';
import { CreateChannelSchema } from '../../../../lib/shared/plant.ts';

/** Every channel with its unit, valid range and the topic its device publishes on (product.md §6). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await channelViews());
};

/** Engineer: a new channel `{assetId, deviceId, name, kind, unit, min, max, key?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'plant.configure');
  const input = await readJson(request, CreateChannelSchema);
  return Response.json(await createChannel(actorOf(user, clientAddress), input), { status: 201 });
};
