import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../lib/server/http.ts';
import { listSurveys } from '../../../../lib/server/services/surveys.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { SurveyItemSchema } from '../../../../lib/shared/api/ovens.ts';

export const contract = {
  GET: operation({
    summary: 'One survey',
    tag: 'ovens',
    action: 'view',
    responses: { 200: SurveyItemSchema },
  }),
};

/** One survey. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  const [s] = await listSurveys(undefined, idParam(params['id'], 'survey'));
  if (!s) throw new HttpProblem(404, 'Not found', 'No such survey.');
  return Response.json(s);
};
