import type { APIRoute } from 'astro';
import { signOut } from '../lib/server/services/sessions.ts';

export const POST: APIRoute = async ({ cookies, url, locals, clientAddress, redirect }) => {
  await signOut(cookies, url, locals, clientAddress);
  return redirect('/login', 303);
};
