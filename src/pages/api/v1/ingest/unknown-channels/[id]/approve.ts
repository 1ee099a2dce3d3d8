import type { APIRoute } from 'astro';
import { actorOf, requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../../lib/server/http.ts';
import { approveUnknownChannel } from '../../../../../../lib/server/services/plant-setup.ts';
import { ApproveUnknownChannelSchema } from '../../../../../../lib/shared/plant.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { ChannelViewSchema } from '../../../../../../lib/shared/api/plant.ts';

export const contract = {
  POST: operation({
    summary: 'Turn an unknown topic into a channel',
    tag: 'plant',
    action: 'plant.configure',
    body: ApproveUnknownChannelSchema,
    responses: { 201: ChannelViewSchema },
    problems: [409],
  }),
};

/**
 * Engineer: approve a topic a known device published on but no channel matched:
 * `{name, kind, unit, min, max}` creates the channel on the asset and code its topic names.
 */
export const POST: APIRoute = async ({ locals, request, params, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'unknown channel');
  const spec = await readJson(request, contract.POST.body);
  return Response.json(await approveUnknownChannel(actorOf(user, clientAddress), id, spec), { status: 201 });
};
