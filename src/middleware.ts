import { defineMiddleware, sequence } from 'astro:middleware';
import { lucia, secureCookies, userFromBearer } from './lib/server/auth.ts';
import { config } from './lib/server/config.ts';
import { DomainError } from './lib/core/errors.ts';
import { startProcessMetrics } from './lib/core/process-metrics.ts';
import { HttpProblem, problemFromDomainError, problemResponse } from './lib/server/http.ts';

// bench:soak reads the web server's own memory, handles and event-loop delay (no-op unless COATRAIL_METRICS_DIR).
startProcessMetrics('web');

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

function clientAddress(ctx: { clientAddress?: string; request: Request }): string | null {
  try {
    return ctx.clientAddress ?? null;
  } catch {
    return null;
  }
}

/**
 * The origins our own pages are served from: the request URL's, the Host header's (what the
 * browser addressed) and PUBLIC_ORIGIN (behind a reverse proxy).
 */
function ownOrigins(ctx: { url: URL; request: Request }): Set<string> {
  const own = new Set([ctx.url.origin]);
  const host = ctx.request.headers.get('host');
  if (host) own.add(`${ctx.url.protocol}//${host}`);
  if (config.publicOrigin) own.add(config.publicOrigin.replace(/\/+$/, ''));
  return own;
}

/** Errors → RFC 9457 problem+json for the API; an unexpected error is logged once and leaks nothing. */
const errors = defineMiddleware(async (ctx, next) => {
  try {
    return await next();
  } catch (caught) {
    const e = caught instanceof DomainError ? problemFromDomainError(caught) : caught;
    if (e instanceof HttpProblem) {
      if (ctx.url.pathname.startsWith('/api/')) return problemResponse(e.status, e.title, e.detail, e.extra);
      return new Response(`${e.title}. ${e.detail ?? ''}`, {
        status: e.status,
        headers: { 'content-type': 'text/plain; charset=utf-8' },
      });
    }
    console.error(`[web] ${ctx.request.method} ${ctx.url.pathname} failed:`, e);
    return problemResponse(500, 'Internal error', 'Something went wrong on the server; it has been logged.');
  }
});

/** Session cookie or bearer token → locals.user; sliding expiry; same-origin for state changes. */
const auth = defineMiddleware(async (ctx, next) => {
  ctx.locals.user = null;
  ctx.locals.session = null;
  const address = clientAddress(ctx);
  const bearer = ctx.request.headers.get('authorization');
  if (bearer && ctx.url.pathname.startsWith('/api/')) {
    ctx.locals.user = await userFromBearer(bearer, address);
    return next();
  }
  const sessionId = ctx.cookies.get(lucia.sessionCookieName)?.value ?? null;
  if (sessionId) {
    const { session, user } = await lucia.validateSession(sessionId);
    const secure = secureCookies(ctx.url);
    if (session?.fresh) {
      const c = lucia.createSessionCookie(session.id);
      ctx.cookies.set(c.name, c.value, { ...c.attributes, secure });
    }
    if (!session) {
      const c = lucia.createBlankSessionCookie();
      ctx.cookies.set(c.name, c.value, { ...c.attributes, secure });
    }
    if (session && user) {
      ctx.locals.session = session;
      ctx.locals.user = { id: user.id, username: user.username, displayName: user.displayName, role: user.role, via: 'session' };
    }
    // Cookie-authenticated state changes must come from our own pages (CSRF defence beside SameSite=Lax).
    if (STATE_CHANGING.has(ctx.request.method)) {
      const origin = ctx.request.headers.get('origin');
      const site = ctx.request.headers.get('sec-fetch-site');
      if ((origin && !ownOrigins(ctx).has(origin)) || site === 'cross-site') {
        throw new HttpProblem(403, 'Cross-site request refused', 'State-changing requests must come from Coatrail’s own pages.');
      }
    }
  }
  return next();
});

export const onRequest = sequence(errors, auth);
