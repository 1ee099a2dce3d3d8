import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { closeNc } from '../../../../../lib/server/services/holds.ts';
import { NcCloseSchema } from '../../../../../lib/shared/quality.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { NcClosedSchema } from '../../../../../lib/shared/api/quality.ts';

export const contract = {
  POST: operation({
    summary: 'Close a nonconformance (electronic signature)',
    tag: 'quality',
    action: 'nc.write',
    body: NcCloseSchema,
    responses: { 200: NcClosedSchema },
    problems: [409, 429],
  }),
};

/** Close a nonconformance (quality, signed) once none of its jobs is still on hold. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'nonconformance');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await closeNc(user, id, input, clientAddress));
};
