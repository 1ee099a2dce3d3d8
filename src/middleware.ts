import { defineMiddleware, sequence } from 'astro:middleware';
import { lucia, secureCookies, userFromBearer } from './lib/server/auth.ts';
import { DomainError } from './lib/core/errors.ts';
import { startProcessMetrics } from './lib/core/process-metrics.ts';
import { HttpProblem, problemFromDomainError, problemResponse } from './lib/server/http.ts';
import {
  allowedHost,
  contentSecurityPolicy,
  inlineScriptHashes,
  openWhileMustChange,
  ownOrigin,
  securityHeaders,
} from './lib/server/edge.ts';

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
      ctx.locals.user = {
        id: user.id,
        username: user.username,
        displayName: user.displayName,
        role: user.role,
        via: 'session',
        mustChangePassword: user.mustChangePassword,
      };
    }
    // Cookie-authenticated state changes must come from our own pages (CSRF defence beside SameSite=Lax).
    if (STATE_CHANGING.has(ctx.request.method)) {
      const origin = ctx.request.headers.get('origin');
      const site = ctx.request.headers.get('sec-fetch-site');
      if ((origin && !ownOrigin(origin)) || site === 'cross-site') {
        throw new HttpProblem(403, 'Cross-site request refused', 'State-changing requests must come from Coatrail’s own pages.');
      }
    }
  }
  return next();
});

/**
 * Host allow-list (DNS-rebinding defence): loopback names and PUBLIC_ORIGIN's host; any other
 * Host is answered 421 before anything else runs.
 */
const host = defineMiddleware(async (ctx, next) => {
  if (!allowedHost(ctx.request.headers.get('host'))) {
    return problemResponse(421, 'Misdirected request', 'This server does not answer to that host name.');
  }
  return next();
});

/** Until someone else's password is replaced, only the change-password page and its API answer. */
const mustChange = defineMiddleware(async (ctx, next) => {
  const user = ctx.locals.user;
  if (user?.mustChangePassword && user.via === 'session' && !openWhileMustChange(ctx.url.pathname)) {
    if (ctx.url.pathname.startsWith('/api/')) {
      throw new HttpProblem(
        403,
        'Change your password first',
        'Set your own password (POST /api/auth/change-password) before anything else.',
      );
    }
    const next = ctx.url.pathname + ctx.url.search;
    return ctx.redirect(`/change-password?next=${encodeURIComponent(next)}`, 303);
  }
  return next();
});

const COOKIES = Symbol.for('astro.cookies');

/** Security headers on every response; HTML gets a CSP naming its inline scripts' hashes. */
const headers = defineMiddleware(async (ctx, next) => {
  const res = await next();
  const extra = securityHeaders(ctx.url);
  const type = res.headers.get('content-type') ?? '';
  let out = res;
  if (type.startsWith('text/html') && res.body) {
    const html = await res.text();
    out = new Response(html, { status: res.status, statusText: res.statusText, headers: new Headers(res.headers) });
    Reflect.set(out, COOKIES, Reflect.get(res, COOKIES));
    out.headers.set('content-security-policy', contentSecurityPolicy(inlineScriptHashes(html)));
  } else if (!res.headers.has('content-security-policy')) {
    extra['content-security-policy'] = "default-src 'none'; frame-ancestors 'none'";
  }
  try {
    for (const [k, v] of Object.entries(extra)) if (!out.headers.has(k)) out.headers.set(k, v);
  } catch {
    // immutable headers (Response.redirect): copy once
    const copy = new Response(out.body, { status: out.status, statusText: out.statusText, headers: new Headers(out.headers) });
    Reflect.set(copy, COOKIES, Reflect.get(out, COOKIES));
    for (const [k, v] of Object.entries(extra)) if (!copy.headers.has(k)) copy.headers.set(k, v);
    out = copy;
  }
  return out;
});

export const onRequest = sequence(headers, errors, host, auth, mustChange);
