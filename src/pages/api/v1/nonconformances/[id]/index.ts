import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../lib/server/http.ts';
import { getNc } from '../../../../../lib/server/services/holds.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { NcDetailSchema } from '../../../../../lib/shared/api/quality.ts';

export const contract = {
  GET: operation({
    summary: 'One nonconformance with its tests, holds and dispositions',
    tag: 'quality',
    action: 'view',
    responses: { 200: NcDetailSchema },
  }),
};

/** One nonconformance: its failed tests, suspected cause, holds and signed dispositions. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  const nc = await getNc(idParam(params['id'], 'nonconformance'));
  if (!nc) throw new HttpProblem(404, 'Not found', 'No such nonconformance.');
  return Response.json(nc);
};
