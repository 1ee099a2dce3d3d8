import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson } from '../../../../../lib/server/http.ts';
import { commitJobCsv } from '../../../../../lib/server/services/dips.ts';
import { JobImportCommitSchema } from '../../../../../lib/shared/jobs.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { JobImportResultSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  POST: operation({
    summary: 'Commit a job import',
    tag: 'production',
    action: 'dip.record',
    body: JobImportCommitSchema,
    responses: { 201: JobImportResultSchema },
    problems: [409],
  }),
};

/**
 * Job CSV import, step 2 of 2 (operator, engineer): `{csv, sha256, dipRunId?}` stores the good
 * rows of the previewed file (409 when the file differs from its preview); bad rows are skipped.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await commitJobCsv(user, input, clientAddress), { status: 201 });
};
