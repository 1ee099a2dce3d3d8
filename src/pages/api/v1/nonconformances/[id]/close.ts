import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { closeNc } from '../../../../../lib/server/services/holds.ts';
import { NcCloseSchema } from '../../../../../lib/shared/quality.ts';

/** Close a nonconformance (quality, signed) once none of its jobs is still on hold. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'nc.write');
  const id = idParam(params['id'], 'nonconformance');
  const input = await readJson(request, NcCloseSchema);
  return Response.json(await closeNc(user, id, input, clientAddress));
};
