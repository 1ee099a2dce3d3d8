import type { APIRoute } from 'astro';
import { signOut } from '../../../lib/server/services/sessions.ts';

/** Public: ends the current session (a no-op when there is none). */
export const POST: APIRoute = async ({ cookies, url, locals, clientAddress }) => {
  await signOut(cookies, url, locals, clientAddress);
  return Response.json({ signedOut: true });
};
