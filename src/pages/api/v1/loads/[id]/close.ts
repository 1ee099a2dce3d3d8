import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { closeLoadByHand } from '../../../../../lib/server/services/loads.ts';
import { LoadCloseSchema } from '../../../../../lib/shared/jobs.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { ClosedLoadSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  POST: operation({
    summary: 'Close an open load (the cure record is computed at once)',
    tag: 'production',
    action: 'load.manage',
    body: LoadCloseSchema,
    responses: { 200: ClosedLoadSchema },
    problems: [409],
  }),
};

/** Close an open load by hand (operator, engineer); the cure record is computed at once. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'oven load');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await closeLoadByHand(user, id, input, clientAddress));
};
