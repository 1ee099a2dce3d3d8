import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, BODY_LIMITS, readJson } from '../../../../../lib/server/http.ts';
import { trialStudy } from '../../../../../lib/server/services/spc.ts';
import { StudyInputSchema } from '../../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { TrialStudySchema } from '../../../../../lib/shared/api/spc.ts';

export const contract = {
  POST: operation({
    summary: 'Phase I trial limits (not stored)',
    tag: 'spc',
    action: 'limits.study',
    body: StudyInputSchema,
    responses: { 200: TrialStudySchema },
  }),
};

/**
 * A trial control-limit study on a baseline period (engineer): trial limits from the included
 * points, every baseline point judged against them, and the Phase I exclusions the library
 * suggests (never applied by themselves). Nothing is stored.
 */
export const POST: APIRoute = async ({ locals, params, request }) => {
  requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await trialStudy(id, input));
};
