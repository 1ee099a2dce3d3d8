import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { adhesionPChart, failuresByBathCharge, failuresByOven } from '../../../../lib/server/services/quality.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AdhesionSchema } from '../../../../lib/shared/api/quality.ts';

const Query = z.object({
  weeks: z.coerce.number().int().min(2).max(104).default(12),
  days: z.coerce.number().int().min(1).max(730).default(90),
});

export const contract = {
  GET: operation({
    summary: 'Adhesion failure rate per week and by oven and bath charge',
    tag: 'quality',
    action: 'view',
    query: Query,
    responses: { 200: AdhesionSchema },
  }),
};

/** Adhesion failure rate per week as a p chart, and adhesion failures by oven and by bath charge. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const [chart, byOven, byBathCharge] = await Promise.all([
    adhesionPChart(q.weeks),
    failuresByOven(q.days),
    failuresByBathCharge(q.days),
  ]);
  return Response.json({ chart, byOven, byBathCharge });
};
