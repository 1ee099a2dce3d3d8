import type { APIRoute } from 'astro';
import { readJson } from '../../../lib/server/http.ts';
import { signIn } from '../../../lib/server/services/sessions.ts';
import { LoginSchema } from '../../../lib/shared/auth.ts';

/** Public: `{"username","password"}` → 200 and a session cookie; 401 otherwise. */
export const POST: APIRoute = async ({ request, cookies, url, clientAddress }) => {
  const input = await readJson(request, LoginSchema);
  const user = await signIn(cookies, url, input.username, input.password, clientAddress);
  return Response.json({ user: { id: user.id, username: user.username, displayName: user.displayName, role: user.role } });
};
