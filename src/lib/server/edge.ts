/**
 * Request edge policy shared by the middleware: which Host names we answer to (DNS-rebinding
 * defence), which origins count as our own (CSRF), where an account that must change its
 * password may go, and the security headers of every response.
 */
import { createHash } from 'node:crypto';
import { config } from './config.ts';

const LOOPBACK_HOSTS = new Set(['localhost', '127.0.0.1', '[::1]', '::1']);

/** The host name of a Host header value (port and IPv6 brackets handled), lower-case. */
export function hostName(host: string): string {
  const h = host.trim().toLowerCase();
  if (h.startsWith('[')) {
    const end = h.indexOf(']');
    return end > 0 ? h.slice(0, end + 1) : h;
  }
  const colon = h.indexOf(':');
  return colon >= 0 ? h.slice(0, colon) : h;
}

/** Host names we answer to: loopback names, and PUBLIC_ORIGIN's host when set. */
export function allowedHost(host: string | null, publicOrigin: string | null = config.publicOrigin): boolean {
  if (!host) return false;
  const name = hostName(host);
  if (LOOPBACK_HOSTS.has(name)) return true;
  if (!publicOrigin) return false;
  try {
    return new URL(publicOrigin).hostname.toLowerCase() === name || `[${new URL(publicOrigin).hostname}]` === name;
  } catch {
    return false;
  }
}

/** Whether an Origin header names one of our own origins: PUBLIC_ORIGIN, or a loopback origin. */
export function ownOrigin(origin: string, publicOrigin: string | null = config.publicOrigin): boolean {
  let u: URL;
  try {
    u = new URL(origin);
  } catch {
    return false;
  }
  if (u.protocol !== 'http:' && u.protocol !== 'https:') return false;
  if (LOOPBACK_HOSTS.has(u.hostname.toLowerCase())) return true;
  if (!publicOrigin) return false;
  try {
    return new URL(publicOrigin).origin === u.origin;
  } catch {
    return false;
  }
}

/** Paths open to an account that must change its password (besides static assets). */
export function openWhileMustChange(pathname: string): boolean {
  return (
    pathname === '/change-password' ||
    pathname === '/api/auth/change-password' ||
    pathname === '/logout' ||
    pathname === '/api/auth/logout' ||
    pathname === '/api/health' ||
    pathname.startsWith('/_astro/') ||
    pathname === '/favicon.svg'
  );
}

/** SHA-256 CSP sources of every inline <script> (no src) in an HTML document, found in one scan. */
export function inlineScriptHashes(html: string): string[] {
  const out = new Set<string>();
  const lower = html.toLowerCase();
  let at = 0;
  for (;;) {
    const open = lower.indexOf('<script', at);
    if (open < 0) break;
    const tagEnd = lower.indexOf('>', open);
    if (tagEnd < 0) break;
    const close = lower.indexOf('</script', tagEnd);
    if (close < 0) break;
    const tag = lower.slice(open, tagEnd);
    if (!/\ssrc\s*=/.test(tag)) {
      const body = html.slice(tagEnd + 1, close);
      if (body.length) out.add(`'sha256-${createHash('sha256').update(body, 'utf8').digest('base64')}'`);
    }
    at = close + 8;
  }
  return [...out];
}

/**
 * Content-Security-Policy: own origin only. Inline island bootstraps are allowed by their
 * hashes; inline style attributes (React style props) need 'unsafe-inline' for styles only.
 */
export function contentSecurityPolicy(scriptHashes: readonly string[]): string {
  return [
    `default-src 'self'`,
    `script-src 'self'${scriptHashes.length ? ' ' + scriptHashes.join(' ') : ''}`,
    `style-src 'self' 'unsafe-inline'`,
    `img-src 'self' data: blob:`,
    `font-src 'self' data:`,
    `connect-src 'self'`,
    `object-src 'none'`,
    `base-uri 'self'`,
    `form-action 'self'`,
    `frame-ancestors 'none'`,
  ].join('; ');
}

/** Headers set on every response (HSTS only when the request or the public origin is HTTPS). */
export function securityHeaders(url: URL, publicOrigin: string | null = config.publicOrigin): Record<string, string> {
  const h: Record<string, string> = {
    'x-content-type-options': 'nosniff',
    'referrer-policy': 'same-origin',
    'x-frame-options': 'DENY',
    'permissions-policy': 'camera=(), microphone=(), geolocation=(), payment=()',
  };
  if (url.protocol === 'https:' || (publicOrigin ?? '').startsWith('https:'))
    h['strict-transport-security'] = 'max-age=31536000; includeSubDomains';
  return h;
}
