import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { updateDraft, windowWithVersions } from '../../../../../lib/server/services/windows.ts';
import { WindowDraftUpdateSchema } from '../../../../../lib/shared/windows.ts';

/** One window version with every version of its lacquer × substrate (each with its diff vs the previous) and its assignments. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await windowWithVersions(idParam(params['id'], 'process window')));
};

/** Edit a draft (engineer); effective and superseded versions are immutable. */
export const PATCH: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'window.edit');
  const id = idParam(params['id'], 'process window');
  const input = await readJson(request, WindowDraftUpdateSchema);
  return Response.json(await updateDraft(user, id, input, clientAddress));
};
