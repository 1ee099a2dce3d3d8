import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson } from '../../../../lib/server/http.ts';
import { computeSurvey } from '../../../../lib/server/services/surveys.ts';
import { SurveyInputSchema } from '../../../../lib/shared/surveys.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { SurveyComputationSchema } from '../../../../lib/shared/api/ovens.ts';

export const contract = {
  POST: operation({
    summary: 'Check and compute a survey without storing it',
    tag: 'ovens',
    action: 'survey.record',
    body: SurveyInputSchema,
    responses: { 200: SurveyComputationSchema },
    problems: [422],
  }),
};

/** Check and compute a survey without storing it (engineer, quality). */
export const POST: APIRoute = async ({ locals, request }) => {
  requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await computeSurvey(input));
};
