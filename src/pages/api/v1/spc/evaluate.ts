import type { APIRoute } from 'astro';
import { evaluateSpc } from '../../../../lib/domain/spc/evaluate.ts';
import { requireRole } from '../../../../lib/server/guard.ts';
import { BODY_LIMITS, readJson } from '../../../../lib/server/http.ts';
import { SpcEvaluateInputSchema } from '../../../../lib/shared/spc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { SpcEvaluateOutputSchema } from '../../../../lib/shared/api/spc.ts';

export const contract = {
  POST: operation({
    summary: 'Stateless SPC on posted data (product.md §6)',
    description:
      "Stateless SPC on posted data: limits, dispersion, per-point rule violations and (with `spec`) capability. Every bad input is a 400 with the offending field's path.",
    tag: 'spc',
    action: 'spc.evaluate',
    body: SpcEvaluateInputSchema,
    responses: { 200: SpcEvaluateOutputSchema },
  }),
};

/**
 * Stateless SPC on posted data (product.md §6): any signed-in role or API token. The body is
 * validated by the shared schema (every bad input is a 400 problem with the offending field's
 * path: too few points, unequal subgroup sizes, negative counts, a non-number such as "NaN" or
 * null in a data array, a spec without limits …); the maths is the domain library's.
 */
export const POST: APIRoute = async ({ request, locals }) => {
  requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body, BODY_LIMITS.bulkJson);
  return Response.json(evaluateSpc(input), { headers: { 'cache-control': 'no-store' } });
};
