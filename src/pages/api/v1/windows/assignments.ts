import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { assignWindow, listAssignments } from '../../../../lib/server/services/windows.ts';
import { pgPool } from '../../../../lib/server/db.ts';
import { WindowAssignSchema } from '../../../../lib/shared/windows.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AssignedWindowSchema, AssignmentListSchema } from '../../../../lib/shared/api/windows.ts';

const Query = z.object({ assetId: z.coerce.number().int().positive().optional() });

export const contract = {
  GET: operation({
    summary: 'Which window each line/oven ran when',
    tag: 'windows',
    action: 'view',
    query: Query,
    responses: { 200: AssignmentListSchema },
  }),
  POST: operation({
    summary: 'Assign a window to a line/oven from a time',
    tag: 'windows',
    action: 'window.edit',
    body: WindowAssignSchema,
    responses: { 201: AssignedWindowSchema },
  }),
};

/** Assignment history (which window each line/oven ran when), newest first. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const { assetId } = readQuery(url, contract.GET.query);
  return Response.json(await listAssignments(pgPool(), assetId));
};

/** Assign an approved window to a line/oven from a time on (engineer; audited). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await assignWindow(user, input, clientAddress), { status: 201 });
};
