import type { APIRoute } from 'astro';
import { signOut } from '../../../lib/server/services/sessions.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { SignedOutSchema } from '../../../lib/shared/api/service.ts';

export const contract = {
  POST: operation({
    summary: 'Sign out',
    tag: 'auth',
    action: 'public',
    responses: { 200: SignedOutSchema },
  }),
};

/** Public: ends the current session (a no-op when there is none). */
export const POST: APIRoute = async ({ cookies, url, locals, clientAddress }) => {
  await signOut(cookies, url, locals, clientAddress);
  return Response.json({ signedOut: true });
};
