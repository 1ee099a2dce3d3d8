import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { getAcceptance, putAcceptance } from '../../../../lib/server/services/quality.ts';
import { AcceptanceSchema } from '../../../../lib/shared/quality.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  GET: operation({
    summary: 'The lab’s acceptance settings',
    tag: 'quality',
    action: 'view',
    responses: { 200: AcceptanceSchema },
  }),
  PUT: operation({
    summary: 'Replace the acceptance settings',
    tag: 'quality',
    action: 'quality.settings',
    body: AcceptanceSchema,
    responses: { 200: AcceptanceSchema },
  }),
};

/** The lab's acceptance settings (defaults: cross-cut and boil class 0 / 5B only — common practice). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await getAcceptance());
};

/** Replace the acceptance settings (quality); recorded tests keep the settings they were judged by. */
export const PUT: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.PUT.action);
  const input = await readJson(request, contract.PUT.body);
  return Response.json(await putAcceptance(user, input, clientAddress));
};
