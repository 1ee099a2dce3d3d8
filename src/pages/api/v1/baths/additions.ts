import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { listAdditions, recordAddition } from '../../../../lib/server/services/baths.ts';
import { BathAdditionEntrySchema, BathListQuerySchema } from '../../../../lib/shared/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AdditionListSchema, AdditionSchema } from '../../../../lib/shared/api/baths.ts';

export const contract = {
  GET: operation({
    summary: 'Bath additions',
    tag: 'baths',
    action: 'view',
    query: BathListQuerySchema,
    responses: { 200: AdditionListSchema },
  }),
  POST: operation({
    summary: 'Log a solvent or fresh-lacquer addition',
    tag: 'baths',
    action: 'bath.log',
    body: BathAdditionEntrySchema,
    responses: { 201: AdditionSchema },
  }),
};

/** Solvent and fresh-lacquer additions, newest first (`?tankId&limit`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { tankId, limit } = readQuery(url, contract.GET.query);
  return Response.json(await listAdditions(tankId, limit));
};

/** Log an addition (operator, engineer); `checkId` links the check whose recommendation was followed. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await recordAddition(user, input, clientAddress), { status: 201 });
};
