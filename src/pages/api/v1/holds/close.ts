import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { closeHolds } from '../../../../lib/server/services/holds.ts';
import { HoldCloseSchema } from '../../../../lib/shared/quality.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { HoldListSchema } from '../../../../lib/shared/api/quality.ts';

export const contract = {
  POST: operation({
    summary: 'Release or disposition holds (electronic signature)',
    tag: 'quality',
    action: 'hold.release',
    body: HoldCloseSchema,
    responses: { 200: HoldListSchema },
    problems: [429],
  }),
};

/**
 * Release or disposition holds (quality), an electronic signature:
 * `{holdIds, disposition: release|recoat|scrap|use-as-is, comment, password, meaning}`.
 * A wrong password answers 403 and changes nothing.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await closeHolds(user, input, clientAddress));
};
