import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, BODY_LIMITS, readJson } from '../../../../../../lib/server/http.ts';
import { draftLimitSet, limitSetsFor } from '../../../../../../lib/server/services/spc.ts';
import { StudyInputSchema } from '../../../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { DraftLimitSetSchema, LimitSetListSchema } from '../../../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'Control-limit sets',
    tag: 'spc',
    action: 'view',
    responses: { 200: LimitSetListSchema },
  }),
  POST: operation({
    summary: 'Propose a control-limit set',
    tag: 'spc',
    action: 'limits.study',
    body: StudyInputSchema,
    responses: { 201: DraftLimitSetSchema },
  }),
};

/** Every limit set of the characteristic — drafts, the approved one and the superseded ones. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await limitSetsFor(idParam(params['id'], 'characteristic')));
};

/** Save a study as a draft limit set (engineer); it takes effect only when approved with a signature. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await draftLimitSet(user, id, input, clientAddress), { status: 201 });
};
