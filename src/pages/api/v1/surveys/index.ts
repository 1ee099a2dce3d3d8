import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson, readQuery } from '../../../../lib/server/http.ts';
import { listSurveys, recordSurvey, surveyStatus } from '../../../../lib/server/services/surveys.ts';
import { SurveyInputSchema } from '../../../../lib/shared/surveys.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { RecordedSurveySchema, SurveyListSchema } from '../../../../lib/shared/api/ovens.ts';

const Query = z.object({ ovenAssetId: z.coerce.number().int().positive().optional() });

export const contract = {
  GET: operation({
    summary: 'Oven uniformity surveys (?ovenAssetId), with overdue state',
    tag: 'ovens',
    action: 'view',
    query: Query,
    responses: { 200: SurveyListSchema },
  }),
  POST: operation({
    summary: 'Record a uniformity survey',
    tag: 'ovens',
    action: 'survey.record',
    body: SurveyInputSchema,
    responses: { 201: RecordedSurveySchema },
    problems: [422],
  }),
};

/** Uniformity surveys, newest first (`?ovenAssetId`), with each oven's last survey and whether it is overdue. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const [surveys, status] = await Promise.all([listSurveys(q.ovenAssetId), surveyStatus()]);
  return Response.json({ surveys, status });
};

/** Store a survey (engineer, quality): `{ovenAssetId, setpointC, csv, stabilisedFromMinutes?, corrections?, surveyedAt?, note?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await recordSurvey(user, input, clientAddress), { status: 201 });
};
