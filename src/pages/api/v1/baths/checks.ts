import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listChecks, recordCheck } from '../../../../lib/server/services/baths.ts';
import { BathCheckInputSchema, BathListQuerySchema } from '../../../../lib/shared/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { BathCheckListSchema, RecordedCheckSchema } from '../../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Bath checks',
    tag: 'baths',
    action: 'view',
    query: BathListQuerySchema,
    responses: { 200: BathCheckListSchema },
  }),
  POST: operation({
    summary: 'Log a bath check (viscosity computed and stored by the server)',
    tag: 'baths',
    action: 'bath.log',
    body: BathCheckInputSchema,
    responses: { 201: RecordedCheckSchema },
  }),
};

/** Bath checks, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { tankId, limit } = readQuery(url, contract.GET.query);
  return Response.json(await listChecks(tankId, limit));
};

/**
 * Log a bath check (operator, engineer): cup + efflux seconds or a measured viscosity. The
 * server computes the viscosity itself and stores it with the check; an efflux time outside
 * the cup's window is refused ("out of range — use another cup").
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await recordCheck(user, input, clientAddress), { status: 201 });
};
