import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { approveWindow } from '../../../../../lib/server/services/windows.ts';
import { WindowApproveSchema } from '../../../../../lib/shared/windows.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { ApprovedWindowSchema } from '../../../../../lib/shared/api/windows.ts';

export const contract = {
  POST: operation({
    summary: 'Approve a draft with an electronic signature (effective now; previous version superseded)',
    tag: 'windows',
    action: 'window.approve',
    body: WindowApproveSchema,
    responses: { 200: ApprovedWindowSchema },
    problems: [409, 429],
  }),
};

/** Approve a draft with an electronic signature `{password, meaning:'approved'}`: effective from now, the previous version superseded. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'process window');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await approveWindow(user, id, input, clientAddress));
};
