import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { dispositionNc } from '../../../../../lib/server/services/holds.ts';
import { NcDispositionSchema } from '../../../../../lib/shared/quality.ts';

/** Disposition held jobs of a nonconformance (quality, signed): `{holdIds, disposition, comment, password, meaning}`. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'hold.release');
  const id = idParam(params['id'], 'nonconformance');
  const input = await readJson(request, NcDispositionSchema);
  return Response.json(await dispositionNc(user, id, input, clientAddress), { status: 201 });
};
