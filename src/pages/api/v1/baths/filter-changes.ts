import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listFilterChanges, recordFilterChange } from '../../../../lib/server/services/baths.ts';
import { BathListQuerySchema, FilterChangeSchema } from '../../../../lib/shared/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { FilterChangeListSchema, FilterChangeRowSchema } from '../../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Filter changes',
    tag: 'baths',
    action: 'view',
    query: BathListQuerySchema,
    responses: { 200: FilterChangeListSchema },
  }),
  POST: operation({
    summary: 'Log a filter change',
    tag: 'baths',
    action: 'bath.log',
    body: FilterChangeSchema,
    responses: { 201: FilterChangeRowSchema },
  }),
};

/** Filter changes, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { tankId, limit } = readQuery(url, contract.GET.query);
  return Response.json(await listFilterChanges(tankId, limit));
};

/** Log a filter change (operator, engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await recordFilterChange(user, input, clientAddress), { status: 201 });
};
