/** Session and CSRF middleware for the JSON API. */
import type { Context, MiddlewareHandler } from 'hono';
import { getConnInfo } from '@hono/node-server/conninfo';
import { readSessionToken, sessionCookie } from '../auth/cookies.js';
import { clientAddress as addressOf } from '../auth/client-address.js';
import { isAllowedOrigin } from '../auth/origin.js';
import { HttpError, unauthenticated } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';

/** Secure cookies when the public site is https, or the request itself arrived over https. */
export function isSecure(c: Context, publicUrl: string | undefined): boolean {
  if (publicUrl) return publicUrl.startsWith('https:');
  return new URL(c.req.url).protocol === 'https:';
}

/** The caller's address for rate limits (auth/client-address.ts: X-Forwarded-For only with TRUST_PROXY). */
export function clientAddress(c: Context, trustProxy: number): string {
  let socket: string | undefined;
  try {
    socket = getConnInfo(c).remote.address;
  } catch {
    socket = undefined; // app.request() in tests has no socket
  }
  return addressOf(socket, c.req.header('x-forwarded-for'), trustProxy);
}

/** 429 with Retry-After for a refused attempt, in words. */
export function tooMany(begun: { retryAfter: number; reason: 'limit' | 'busy' }, what: string): HttpError {
  const message =
    begun.reason === 'busy'
      ? `The server is refusing new ${what} for a moment (too many at once). Try again in ${begun.retryAfter} s.`
      : `Too many failed ${what}. Try again in ${begun.retryAfter} s.`;
  return new HttpError(429, 'rate_limited', message, { 'Retry-After': String(begun.retryAfter) });
}

/**
 * Refuses state-changing requests from foreign origins (after the Lucia guide: non-GET requests must
 * carry an Origin, or a Referer, matching the allowed origin exactly — auth/origin.ts). Checked with
 * or without a session cookie: without one, the only writes that succeed are those that start a
 * session (sign-in, set-up, an invitation or reset link), and a forged one would sign the victim's
 * browser in to the attacker's account (login CSRF).
 */
export function csrf(deps: AppDeps): MiddlewareHandler<AppEnv> {
  return async (c, next) => {
    const method = c.req.method;
    if (method !== 'GET' && method !== 'HEAD' && method !== 'OPTIONS') {
      const ok = isAllowedOrigin(
        { origin: c.req.header('origin'), referer: c.req.header('referer'), selfOrigin: new URL(c.req.url).origin },
        deps.config.publicUrl,
      );
      if (!ok) throw new HttpError(403, 'bad_origin', 'Request refused: it did not come from this site (Origin check).');
    }
    await next();
  };
}

/** Requires a valid session; re-sends the cookie when the expiry slid forward. */
export function requireSession(deps: AppDeps): MiddlewareHandler<AppEnv> {
  return async (c, next) => {
    // Idempotent: nested route groups may each declare it.
    if (c.get('session')) return next();
    const token = readSessionToken(c.req.header('cookie'));
    const session = token ? await deps.sessions.validate(token) : null;
    if (!session) throw unauthenticated();
    if (session.renewed) c.header('Set-Cookie', sessionCookie(token!, session.expiresAt, isSecure(c, deps.config.publicUrl)), { append: true });
    c.set('session', session);
    await next();
  };
}

/** 503 `not_ready` for every API route but /api/health while start-up steps are pending (readiness.ts). */
export function whenReady(deps: AppDeps): MiddlewareHandler<AppEnv> {
  return async (c, next) => {
    const waiting = deps.readiness?.pending() ?? [];
    if (waiting.length > 0 && c.req.path !== '/api/health') {
      throw new HttpError(503, 'not_ready', `Gloss is still starting (${waiting.join(', ')}). Try again in a moment.`, { 'Retry-After': '2' });
    }
    await next();
  };
}
