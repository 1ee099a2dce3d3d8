/** Sign-in and sign-out shared by the JSON API and the sign-in page. */
import type { AstroCookies } from 'astro';
import { lucia, checkCredentials, secureCookies } from '../auth.ts';
import { audit } from '../audit.ts';

export async function signIn(cookies: AstroCookies, url: URL, username: string, password: string, address: string | null) {
  const user = await checkCredentials(username, password, address);
  const session = await lucia.createSession(user.id, {});
  // Housekeeping: drop sessions that ran out (cheap; the table holds one row per live sign-in).
  void lucia.deleteExpiredSessions().catch(() => {});
  const c = lucia.createSessionCookie(session.id);
  cookies.set(c.name, c.value, { ...c.attributes, secure: secureCookies(url) });
  await audit({ id: user.id, label: user.username, address }, { action: 'auth.signed-in', entity: 'user', entityId: user.id });
  return user;
}

export async function signOut(cookies: AstroCookies, url: URL, locals: App.Locals, address: string | null) {
  if (locals.session) {
    await lucia.invalidateSession(locals.session.id);
    if (locals.user)
      await audit(
        { id: locals.user.id, label: locals.user.username, address },
        { action: 'auth.signed-out', entity: 'user', entityId: locals.user.id },
      );
  }
  const c = lucia.createBlankSessionCookie();
  cookies.set(c.name, c.value, { ...c.attributes, secure: secureCookies(url) });
}
