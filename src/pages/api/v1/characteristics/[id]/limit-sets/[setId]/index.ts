import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../../../lib/server/http.ts';
import { discardDraft, limitSetFor } from '../../../../../../../lib/server/services/spc.ts';
import { operation } from '../../../../../../../lib/server/api-operation.ts';
import { LimitSetViewSchema } from '../../../../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'One control-limit set',
    tag: 'spc',
    action: 'view',
    responses: { 200: LimitSetViewSchema },
  }),
  DELETE: operation({
    summary: 'Withdraw a proposed limit set',
    tag: 'spc',
    action: 'limits.study',
    responses: { 204: null },
    problems: [409],
  }),
};

/** One limit set (any status; superseded sets stay readable). */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await limitSetFor(idParam(params['id'], 'characteristic'), idParam(params['setId'], 'limit set')));
};

/** Discard a draft (engineer); approved and superseded sets cannot be deleted (409). */
export const DELETE: APIRoute = async ({ locals, params, clientAddress }) => {
  const user = requireRole(locals, contract.DELETE.action);
  await discardDraft(user, idParam(params['id'], 'characteristic'), idParam(params['setId'], 'limit set'), clientAddress);
  return new Response(null, { status: 204 });
};
