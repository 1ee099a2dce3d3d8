import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { putSurveySettings, surveySettings } from '../../../../lib/server/services/surveys.ts';
import { SurveySettingsSchema } from '../../../../lib/shared/surveys.ts';

/** Survey settings: the interval after which an oven is overdue and the uniformity class table. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await surveySettings());
};

/** Change the survey settings (engineer); audited. */
export const PUT: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'plant.configure');
  const input = await readJson(request, SurveySettingsSchema);
  return Response.json(await putSurveySettings(user, input, clientAddress));
};
