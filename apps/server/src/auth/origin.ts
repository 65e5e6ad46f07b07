/**
 * CSRF defence for cookie-authenticated requests: a state-changing request (and every WebSocket
 * upgrade) must come from an allowed origin — the configured PUBLIC_URL or the request's own host.
 * Origin is checked when present, else Referer; a request carrying neither is refused (browsers
 * send Origin on cross-site POSTs and on WebSocket handshakes).
 */
export interface OriginRequest {
  origin: string | undefined | null;
  referer: string | undefined | null;
  host: string | undefined | null;
}

export function originOf(value: string): string | null {
  try {
    const u = new URL(value);
    return u.origin === 'null' ? null : u.origin;
  } catch {
    return null;
  }
}

export function isAllowedOrigin(req: OriginRequest, publicUrl: string | undefined): boolean {
  const claimed = req.origin ? originOf(req.origin) : req.referer ? originOf(req.referer) : null;
  if (!claimed) return false;
  if (publicUrl && claimed === originOf(publicUrl)) return true;
  if (!req.host) return false;
  // Same host as the request reached, on either scheme (a TLS proxy may sit in front).
  const host = new URL(claimed).host;
  return host.toLowerCase() === req.host.toLowerCase();
}
