import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { idParam, BODY_LIMITS, readJson } from '../../../../../../lib/server/http.ts';
import { draftLimitSet, limitSetsFor } from '../../../../../../lib/server/services/spc.ts';
import { StudyInputSchema } from '../../../../../../lib/shared/characteristics.ts';

/** Every limit set of the characteristic — drafts, the approved one and the superseded ones. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, 'view');
  return Response.json(await limitSetsFor(idParam(params['id'], 'characteristic')));
};

/** Save a study as a draft limit set (engineer); it takes effect only when approved with a signature. */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, 'limits.study');
  const id = idParam(params['id'], 'characteristic');
  const input = await readJson(request, StudyInputSchema, BODY_LIMITS.bulkJson);
  return Response.json(await draftLimitSet(user, id, input, clientAddress), { status: 201 });
};
