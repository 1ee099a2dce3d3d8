import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { signIn } from '../../../lib/server/services/sessions.ts';
import { LoginSchema } from '../../../lib/shared/auth.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { SignedInSchema } from '../../../lib/shared/api/service.ts';

export const contract = {
  POST: operation({
    summary: 'Sign in; sets the session cookie',
    tag: 'auth',
    action: 'public',
    body: LoginSchema,
    responses: { 200: SignedInSchema },
    problems: [401, 429],
  }),
};

/** Public: `{"username","password"}` → 200 and a session cookie; 401 otherwise. */
export const POST: APIRoute = async ({ request, cookies, url, clientAddress }) => {
  const input = await readJson(request, contract.POST.body);
  const user = await signIn(cookies, url, input.username, input.password, clientAddress);
  return Response.json({ user: { id: user.id, username: user.username, displayName: user.displayName, role: user.role } });
};
