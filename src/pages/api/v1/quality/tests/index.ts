import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson, readQuery } from '../../../../../lib/server/http.ts';
import { createTest, listTests, testsCsv } from '../../../../../lib/server/services/quality.ts';
import { TestCreateSchema, TestListQuerySchema } from '../../../../../lib/shared/quality.ts';

/**
 * Quality tests, failed first then newest (`?result=pass|fail&kind&job&from&to&limit`; `format=csv`).
 * product.md §6: `GET /api/v1/quality/tests?result=fail` → `[{id, jobNumber, kind, result, …}]`.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, TestListQuerySchema);
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
  const user = requireRole(locals, 'quality.record');
  const input = await readJson(request, TestCreateSchema, BODY_LIMITS.bulkJson);
  return Response.json(await createTest(user, input, clientAddress), { status: 201 });
};
