import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createDraft, listWindows } from '../../../../lib/server/services/windows.ts';
import { WINDOW_STATUSES, WindowDraftCreateSchema } from '../../../../lib/shared/windows.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { WindowListSchema, WindowViewSchema } from '../../../../lib/shared/api/windows.ts';

const ListQuery = z.object({ status: z.enum(WINDOW_STATUSES).optional() });

export const contract = {
  GET: operation({
    summary: 'Process-window versions',
    tag: 'windows',
    action: 'view',
    query: ListQuery,
    responses: { 200: WindowListSchema },
  }),
  POST: operation({
    summary: 'New draft version of a lacquer × substrate window',
    tag: 'windows',
    action: 'window.edit',
    body: WindowDraftCreateSchema,
    responses: { 201: WindowViewSchema },
  }),
};

/** Every window version (optionally one status), for everyone signed in. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const query = readQuery(url, contract.GET.query);
  return Response.json(await listWindows(query.status ? { status: query.status } : {}));
};

/** A new draft version of a lacquer × substrate window (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createDraft(user, input, clientAddress), { status: 201 });
};
