import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { requestReset } from '../../../lib/server/services/accounts.ts';
import { FORGOT_PASSWORD_ANSWER, ForgotPasswordSchema } from '../../../lib/shared/admin.ts';

/** Public: `{login}` (username or e-mail). Always the same 202 answer: no enumeration. */
export const POST: APIRoute = async ({ request, url, clientAddress }) => {
  const { login } = await readJson(request, ForgotPasswordSchema);
  await requestReset(login, url.origin, clientAddress);
  return Response.json({ message: FORGOT_PASSWORD_ANSWER }, { status: 202 });
};
