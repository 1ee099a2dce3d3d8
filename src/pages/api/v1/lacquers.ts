import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createLacquer, listLacquers } from '../../../lib/server/services/windows.ts';
import { LacquerCreateSchema } from '../../../lib/shared/baths.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { LacquerListSchema, LacquerSchema } from '../../../lib/shared/api/windows.ts';

export const contract = {
  GET: operation({
    summary: 'Lacquers',
    tag: 'windows',
    action: 'view',
    responses: { 200: LacquerListSchema },
  }),
  POST: operation({
    summary: 'Add a lacquer',
    tag: 'windows',
    action: 'window.edit',
    body: LacquerCreateSchema,
    responses: { 201: LacquerSchema },
    problems: [409],
  }),
};

/** Lacquers (name, maker, nominal solids, density, activation energy). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listLacquers());
};

/** Add a lacquer (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createLacquer(user, input, clientAddress), { status: 201 });
};
