import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { completeReset } from '../../../lib/server/services/accounts.ts';
import { ResetPasswordSchema } from '../../../lib/shared/admin.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { PasswordSetSchema } from '../../../lib/shared/api/service.ts';

export const contract = {
  POST: operation({
    summary: 'Set a new password with a reset link',
    tag: 'auth',
    action: 'public',
    body: ResetPasswordSchema,
    responses: { 200: PasswordSetSchema },
    problems: [410],
  }),
};

/**
 * Public: `{token, password}` from an e-mailed link sets a new password. The link works once
 * and for 30 minutes: used → 410, expired → 410, unknown → 400. All sessions of the user end.
 */
export const POST: APIRoute = async ({ request, clientAddress }) => {
  const { token, password } = await readJson(request, contract.POST.body);
  const { username } = await completeReset(token, password, clientAddress);
  return Response.json({ passwordSet: true, username });
};
