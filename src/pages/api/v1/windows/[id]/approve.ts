import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { approveWindow } from '../../../../../lib/server/services/windows.ts';
import { WindowApproveSchema } from '../../../../../lib/shared/windows.ts';

/** Approve a draft with an electronic signature `{password, meaning:'approved'}`: effective from now, the previous version superseded. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'window.approve');
  const id = idParam(params['id'], 'process window');
  const input = await readJson(request, WindowApproveSchema);
  return Response.json(await approveWindow(user, id, input, clientAddress));
};
