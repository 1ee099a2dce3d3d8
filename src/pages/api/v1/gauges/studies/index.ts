import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';
import { GaugeStudyCreateSchema } from '../../../../../lib/shared/msa.ts';

const Query = z.object({ gaugeId: z.coerce.number().int().positive().optional() });

/** Measurement-system studies, newest first (`?gaugeId`), without their readings. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const q = readQuery(url, Query);
  return Response.json({ studies: await gauges.studies(q.gaugeId) });
};

/** Compute and store a study (engineer, quality): gauge R&R (`kind: "grr"`), bias or linearity. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'msa.record');
  const input = await readJson(request, GaugeStudyCreateSchema);
  return Response.json(await gauges.record(user, input, clientAddress), { status: 201 });
};
