import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson, readQuery } from '../../../../../lib/server/http.ts';
import { createTest, listTests, testsCsv } from '../../../../../lib/server/services/quality.ts';
import { TestCreateSchema, TestListQuerySchema } from '../../../../../lib/shared/quality.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { RecordedTestSchema, TestListSchema } from '../../../../../lib/shared/api/quality.ts';

export const contract = {
  GET: operation({
    summary: 'Quality tests (?result=fail…)',
    description: 'Failed first, then newest (`?result=pass|fail&kind&job&from&to&limit`); `?format=csv` for a spreadsheet.',
    tag: 'quality',
    action: 'view',
    query: TestListQuerySchema,
    responses: { 200: { json: TestListSchema, csv: true } },
  }),
  POST: operation({
    summary: 'Record a test',
    tag: 'quality',
    action: 'quality.record',
    body: TestCreateSchema,
    responses: { 201: RecordedTestSchema },
  }),
};

/**
 * Quality tests, failed first then newest (`?result=pass|fail&kind&job&from&to&limit`; `format=csv`).
 * product.md §6: `GET /api/v1/quality/tests?result=fail` → `[{id, jobNumber, kind, result, …}]`.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const items = await listTests(q);
  if (q.format === 'csv') {
    return new Response(await testsCsv(items), {
      headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="quality-tests.csv"' },
    });
  }
  return Response.json(items);
};

/** Record a test (quality): cross-cut, boil + cross-cut, abrasion, thickness (measured or spectrum) or cosmetic. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await createTest(user, input, clientAddress), { status: 201 });
};
