import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { adhesionPChart, failuresByBathCharge, failuresByOven } from '../../../../lib/server/services/quality.ts';

const Query = z.object({
  weeks: z.coerce.number().int().min(2).max(104).default(12),
  days: z.coerce.number().int().min(1).max(730).default(90),
});

/** Adhesion failure rate per week as a p chart, and adhesion failures by oven and by bath charge. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, Query);
  const [chart, byOven, byBathCharge] = await Promise.all([
    adhesionPChart(q.weeks),
    failuresByOven(q.days),
    failuresByBathCharge(q.days),
  ]);
  return Response.json({ chart, byOven, byBathCharge });
};
