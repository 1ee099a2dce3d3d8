import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { gauges } from '../../../../lib/server/services/gauges.ts';
import { GaugeCreateSchema } from '../../../../lib/shared/msa.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { z } from 'zod';

export const contract = {
  GET: operation({
    summary: 'Gauges with their newest gauge R&R verdict',
    tag: 'msa',
    action: 'view',
    responses: { 200: z.looseObject({ gauges: z.array(z.looseObject({})) }) },
  }),
  POST: operation({
    summary: 'Register a gauge',
    tag: 'msa',
    action: 'msa.record',
    body: GaugeCreateSchema,
    responses: { 201: z.looseObject({}) },
  }),
};

/** The lab's gauges with the verdict of each one's newest gauge R&R study. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json({ gauges: await gauges.list() });
};

/** Register a gauge (engineer, quality): `{name, kind, unit, resolution?, note?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await gauges.create(user, input, clientAddress), { status: 201 });
};
