import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { requestReset } from '../../../lib/server/services/accounts.ts';
import { FORGOT_PASSWORD_ANSWER, ForgotPasswordSchema } from '../../../lib/shared/admin.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { MessageSchema } from '../../../lib/shared/api/service.ts';

export const contract = {
  POST: operation({
    summary: 'Ask for a password-reset link by e-mail',
    tag: 'auth',
    action: 'public',
    body: ForgotPasswordSchema,
    responses: { 202: MessageSchema },
  }),
};

/** Public: `{login}` (username or e-mail). Always the same 202 answer: no enumeration. */
export const POST: APIRoute = async ({ request, url, clientAddress }) => {
  const { login } = await readJson(request, contract.POST.body);
  await requestReset(login, url.origin, clientAddress);
  return Response.json({ message: FORGOT_PASSWORD_ANSWER }, { status: 202 });
};
