import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { putSurveySettings, surveySettings } from '../../../../lib/server/services/surveys.ts';
import { SurveySettingsSchema } from '../../../../lib/shared/surveys.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  GET: operation({
    summary: 'Survey interval and uniformity class table',
    tag: 'ovens',
    action: 'view',
    responses: { 200: SurveySettingsSchema },
  }),
  PUT: operation({
    summary: 'Change the survey settings',
    tag: 'ovens',
    action: 'plant.configure',
    body: SurveySettingsSchema,
    responses: { 200: SurveySettingsSchema },
  }),
};

/** Survey settings: the interval after which an oven is overdue and the uniformity class table. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await surveySettings());
};

/** Change the survey settings (engineer); audited. */
export const PUT: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.PUT.action);
  const input = await readJson(request, contract.PUT.body);
  return Response.json(await putSurveySettings(user, input, clientAddress));
};
