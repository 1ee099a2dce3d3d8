/** Sign-in and sign-out shared by the JSON API and the sign-in page (the session and its audit row commit together). */
import type { AstroCookies } from 'astro';
import { createSessionRecord, endSessionRecord } from '../../core/accounts-store.ts';
import { lucia, checkCredentials, newSession, secureCookies } from '../auth.ts';
import { db } from '../db.ts';

export async function signIn(cookies: AstroCookies, url: URL, username: string, password: string, address: string | null) {
  const user = await checkCredentials(username, password, address);
  const session = newSession(user.id);
  await createSessionRecord(db(), { id: user.id, label: user.username, address }, session);
  // Housekeeping: drop sessions that ran out (cheap; the table holds one row per live sign-in).
  void lucia.deleteExpiredSessions().catch(() => {});
  const c = lucia.createSessionCookie(session.id);
  cookies.set(c.name, c.value, { ...c.attributes, secure: secureCookies(url) });
  return user;
}

export async function signOut(cookies: AstroCookies, url: URL, locals: App.Locals, address: string | null) {
  if (locals.session) {
    if (locals.user)
      await endSessionRecord(
        db(),
        { id: locals.user.id, label: locals.user.username, address },
        locals.session.id,
        locals.user.id,
      );
    else await lucia.invalidateSession(locals.session.id);
  }
  const c = lucia.createBlankSessionCookie();
  cookies.set(c.name, c.value, { ...c.attributes, secure: secureCookies(url) });
}
