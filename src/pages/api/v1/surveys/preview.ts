import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson } from '../../../../lib/server/http.ts';
import { computeSurvey } from '../../../../lib/server/services/surveys.ts';
import { SurveyInputSchema } from '../../../../lib/shared/surveys.ts';

/** Check and compute a survey without storing it (engineer, quality). */
export const POST: APIRoute = async ({ locals, request }) => {
  requireRole(locals, 'survey.record');
  const input = await readJson(request, SurveyInputSchema, BODY_LIMITS.bulkJson);
  return Response.json(await computeSurvey(input));
};
