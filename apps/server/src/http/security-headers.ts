/**
 * Security headers on every answer (API, web app, errors), through hono's secureHeaders:
 * - Content-Security-Policy: scripts, workers and connections (fetch and the /sync WebSocket) from this
 *   origin only; no plugins, no <base>, forms post only here; `frame-ancestors 'none'` (and
 *   X-Frame-Options DENY for older browsers) so no site can frame Gloss to trick a click.
 *   style-src allows inline styles: Observable Plot writes a <style> element into each chart's SVG.
 *   img-src allows data: and blob: (small assets inlined by the build, chart and export previews).
 * - Referrer-Policy same-origin: study and text ids in our URLs never reach another site. Not
 *   no-referrer: with it a browser sends `Origin: null` on same-origin POSTs (Fetch standard,
 *   "serializing a request origin"), which the CSRF check would refuse.
 * - X-Content-Type-Options nosniff, and hono's other defaults (COOP, CORP, no DNS prefetch…).
 * - Strict-Transport-Security only when PUBLIC_URL is https: on plain http it means nothing.
 */
import { secureHeaders } from 'hono/secure-headers';

export const CONTENT_SECURITY_POLICY = {
  defaultSrc: ["'self'"],
  scriptSrc: ["'self'"],
  workerSrc: ["'self'"],
  connectSrc: ["'self'"],
  styleSrc: ["'self'", "'unsafe-inline'"],
  imgSrc: ["'self'", 'data:', 'blob:'],
  fontSrc: ["'self'", 'data:'],
  objectSrc: ["'none'"],
  baseUri: ["'none'"],
  formAction: ["'self'"],
  frameAncestors: ["'none'"],
};

export function securityHeaders(publicUrl: string | undefined) {
  const https = publicUrl?.startsWith('https:') ?? false;
  return secureHeaders({
    contentSecurityPolicy: CONTENT_SECURITY_POLICY,
    xFrameOptions: 'DENY',
    referrerPolicy: 'same-origin',
    strictTransportSecurity: https ? 'max-age=15552000; includeSubDomains' : false,
  });
}
