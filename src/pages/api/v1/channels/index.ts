import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { channelViews, createChannel } from '../../../../lib/server/services/plant-setup.ts';
import { CreateChannelSchema } from '../../../../lib/shared/plant.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ChannelListSchema, ChannelViewSchema } from '../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'Channels with unit, range and MQTT topic',
    description: 'Each channel with its unit, valid range and the MQTT topic its device publishes on.',
    tag: 'plant',
    action: 'view',
    responses: { 200: ChannelListSchema },
  }),
  POST: operation({
    summary: 'Add a channel',
    tag: 'plant',
    action: 'plant.configure',
    body: CreateChannelSchema,
    responses: { 201: ChannelViewSchema },
    problems: [409],
  }),
};

/** Every channel with its unit, valid range and the topic its device publishes on (product.md §6). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await channelViews());
};

/** Engineer: a new channel `{assetId, deviceId, name, kind, unit, min, max, key?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createChannel(actorOf(user, clientAddress), input), { status: 201 });
};
