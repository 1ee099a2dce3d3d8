import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { completeReset } from '../../../lib/server/services/accounts.ts';
import { ResetPasswordSchema } from '../../../lib/shared/admin.ts';

/**
 * Public: `{token, password}` from an e-mailed link sets a new password. The link works once
 * and for 30 minutes: used → 410, expired → 410, unknown → 400. All sessions of the user end.
 */
export const POST: APIRoute = async ({ request, clientAddress }) => {
  const { token, password } = await readJson(request, ResetPasswordSchema);
  const { username } = await completeReset(token, password, clientAddress);
  return Response.json({ passwordSet: true, username });
};
