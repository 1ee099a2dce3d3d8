import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../../lib/server/http.ts';
import { getTest } from '../../../../../../lib/server/services/quality.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { TestDetailSchema } from '../../../../../../lib/shared/api/quality.ts';

export const contract = {
  GET: operation({
    summary: 'One test with its inputs, classes, acceptance and files',
    tag: 'quality',
    action: 'view',
    responses: { 200: TestDetailSchema },
  }),
};

/** One test with its inputs, computed classes, reasons, the acceptance it was judged by, and its files. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  const test = await getTest(idParam(params['id'], 'quality test'));
  if (!test) throw new HttpProblem(404, 'Not found', 'No such quality test.');
  return Response.json(test);
};
