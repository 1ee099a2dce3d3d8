import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { gauges } from '../../../../lib/server/services/gauges.ts';
import { GaugeCreateSchema } from '../../../../lib/shared/msa.ts';

/** The lab's gauges with the verdict of each one's newest gauge R&R study. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json({ gauges: await gauges.list() });
};

/** Register a gauge (engineer, quality): `{name, kind, unit, resolution?, note?}`. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'msa.record');
  const input = await readJson(request, GaugeCreateSchema);
  return Response.json(await gauges.create(user, input, clientAddress), { status: 201 });
};
