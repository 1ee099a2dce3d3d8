import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { updateDraft, windowWithVersions } from '../../../../../lib/server/services/windows.ts';
import { WindowDraftUpdateSchema } from '../../../../../lib/shared/windows.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { UpdatedDraftSchema, WindowWithVersionsSchema } from '../../../../../lib/shared/api/windows.ts';

export const contract = {
  GET: operation({
    summary: 'A window with every version (diff vs previous) and its assignments',
    tag: 'windows',
    action: 'view',
    responses: { 200: WindowWithVersionsSchema },
  }),
  PATCH: operation({
    summary: 'Edit a draft',
    tag: 'windows',
    action: 'window.edit',
    body: WindowDraftUpdateSchema,
    responses: { 200: UpdatedDraftSchema },
    problems: [409],
  }),
};

/** One window version with every version of its lacquer × substrate (each with its diff vs the previous) and its assignments. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await windowWithVersions(idParam(params['id'], 'process window')));
};

/** Edit a draft (engineer); effective and superseded versions are immutable. */
export const PATCH: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.PATCH.action);
  const id = idParam(params['id'], 'process window');
  const input = await readJson(request, contract.PATCH.body);
  return Response.json(await updateDraft(user, id, input, clientAddress));
};
