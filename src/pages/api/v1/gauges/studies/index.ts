import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';
import { GaugeStudyCreateSchema } from '../../../../../lib/shared/msa.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';

export const contract = {
  GET: operation({
    summary: 'Measurement-system studies, newest first (?gaugeId)',
    tag: 'msa',
    action: 'view',
    query: z.object({ gaugeId: z.coerce.number().int().positive().optional() }),
    responses: { 200: z.looseObject({ studies: z.array(z.looseObject({})) }) },
  }),
  POST: operation({
    summary: 'Compute and store a gauge R&R, bias or linearity study (AIAG MSA 4th ed.)',
    tag: 'msa',
    action: 'msa.record',
    body: GaugeStudyCreateSchema,
    responses: { 201: z.looseObject({}) },
  }),
};

/** Measurement-system studies, newest first (`?gaugeId`), without their readings. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  return Response.json({ studies: await gauges.studies(q.gaugeId) });
};

/** Compute and store a study (engineer, quality): gauge R&R (`kind: "grr"`), bias or linearity. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await gauges.record(user, input, clientAddress), { status: 201 });
};
