import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson, readQuery } from '../../../../lib/server/http.ts';
import { listSurveys, recordSurvey, surveyStatus } from '../../../../lib/server/services/surveys.ts';
import { SurveyInputSchema } from '../../../../lib/shared/surveys.ts';

const Query = z.object({ ovenAssetId: z.coerce.number().int().positive().optional() });

/** Uniformity surveys, newest first (`?ovenAssetId`), with each oven's last survey and whether it is overdue. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, Query);
  const [surveys, status] = await Promise.all([listSurveys(q.ovenAssetId), surveyStatus()]);
  return Response.json({ surveys, status });
};

/** Store a survey (engineer, quality): `{ovenAssetId, setpointC, csv, stabilisedFromMinutes?, corrections?, surveyedAt?, note?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'survey.record');
  const input = await readJson(request, SurveyInputSchema, BODY_LIMITS.bulkJson);
  return Response.json(await recordSurvey(user, input, clientAddress), { status: 201 });
};
