/** The one helper every endpoint and page uses to check sign-in and role. */
import type { AstroGlobal } from 'astro';
import { can, type Action } from '../shared/roles.ts';
import type { SessionUser } from './auth.ts';
import { HttpProblem } from './http.ts';

/** Actions no API token may perform (people, tokens and device credentials): a signed-in person only. */
export const SESSION_ONLY_ACTIONS: ReadonlySet<Action> = new Set<Action>(['admin.users', 'admin.tokens', 'admin.devices']);

/** Throws 401 when nobody is signed in, 403 when the role may not do `action`. */
export function requireRole(locals: App.Locals, action: Action): SessionUser {
  const user = locals.user;
  if (!user) throw new HttpProblem(401, 'Not signed in', 'Sign in, or send an API token as "Authorization: Bearer <token>".');
  if (user.via === 'token' && SESSION_ONLY_ACTIONS.has(action)) {
    throw new HttpProblem(403, 'Needs a signed-in person', `API tokens may not manage users, tokens or devices (${action}).`);
  }
  if (!can(user.role, action)) {
    throw new HttpProblem(403, 'Not allowed for your role', `The ${user.role} role may not do this (${action}).`);
  }
  return user;
}

/** For pages: redirect to sign-in when anonymous; a 403 page when the role may not see it. */
export function pageGuard(Astro: AstroGlobal, action: Action = 'view'): SessionUser | Response {
  const user = Astro.locals.user;
  if (!user) {
    const next = Astro.url.pathname + Astro.url.search;
    return Astro.redirect(`/login?next=${encodeURIComponent(next)}`);
  }
  if (!can(user.role, action)) {
    return new Response(`Your role (${user.role}) may not open this page.`, {
      status: 403,
      headers: { 'content-type': 'text/plain' },
    });
  }
  return user;
}

/** The actor record for the audit trail. */
export function actorOf(user: SessionUser, address: string | null) {
  return { id: user.id, label: user.via === 'token' ? user.username : user.username, address };
}
