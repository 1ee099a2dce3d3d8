import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson } from '../../../../../lib/server/http.ts';
import { previewJobCsv } from '../../../../../lib/server/services/dips.ts';
import { JobImportPreviewSchema } from '../../../../../lib/shared/jobs.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { JobImportPreviewAnswerSchema } from '../../../../../lib/shared/api/production.ts';

export const contract = {
  POST: operation({
    summary: 'Preview a job import',
    tag: 'production',
    action: 'dip.record',
    body: JobImportPreviewSchema,
    responses: { 200: JobImportPreviewAnswerSchema },
  }),
};

/**
 * Job CSV import, step 1 of 2 (operator, engineer): `{csv}` → good rows, bad rows with line
 * numbers and reasons, and the file's sha256. Nothing is stored.
 */
export const POST: APIRoute = async ({ locals, request }) => {
  requireRole(locals, contract.POST.action);
  const { csv } = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(await previewJobCsv(csv));
};
