import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../../../lib/server/http.ts';
import { approveLimitSet } from '../../../../../../../lib/server/services/spc.ts';
import { ApproveLimitSetSchema } from '../../../../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../../../../lib/server/api-operation.ts';
import { ApprovedLimitSetSchema } from '../../../../../../../lib/shared/api/spc.ts';

export const contract = {
  POST: operation({
    summary: 'Approve a limit set (electronic signature)',
    tag: 'spc',
    action: 'limits.approve',
    body: ApproveLimitSetSchema,
    responses: { 200: ApprovedLimitSetSchema },
    problems: [409, 429],
  }),
};

/**
 * Approve a draft limit set with an electronic signature `{password, meaning: 'approved'}`
 * (21 CFR Part 11: the signer re-enters the password). The previous set is superseded and stays
 * readable; points before the new effective-from keep the limits they were judged against.
 */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'characteristic');
  const setId = idParam(params['setId'], 'limit set');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await approveLimitSet(user, id, setId, input, clientAddress));
};
