import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { closeHolds } from '../../../../lib/server/services/holds.ts';
import { HoldCloseSchema } from '../../../../lib/shared/quality.ts';

/**
 * Release or disposition holds (quality), an electronic signature:
 * `{holdIds, disposition: release|recoat|scrap|use-as-is, comment, password, meaning}`.
 * A wrong password answers 403 and changes nothing.
 */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'hold.release');
  const input = await readJson(request, HoldCloseSchema);
  return Response.json(await closeHolds(user, input, clientAddress));
};
