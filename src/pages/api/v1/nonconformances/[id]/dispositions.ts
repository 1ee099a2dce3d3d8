import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../../lib/server/http.ts';
import { dispositionNc } from '../../../../../lib/server/services/holds.ts';
import { NcDispositionSchema } from '../../../../../lib/shared/quality.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { NcDispositionedSchema } from '../../../../../lib/shared/api/quality.ts';

export const contract = {
  POST: operation({
    summary: 'Disposition held jobs of a nonconformance (electronic signature)',
    tag: 'quality',
    action: 'hold.release',
    body: NcDispositionSchema,
    responses: { 201: NcDispositionedSchema },
    problems: [409, 429],
  }),
};

/** Disposition held jobs of a nonconformance (quality, signed): `{holdIds, disposition, comment, password, meaning}`. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const id = idParam(params['id'], 'nonconformance');
  const input = await readJson(request, contract.POST.body);
  return Response.json(await dispositionNc(user, id, input, clientAddress), { status: 201 });
};
