/**
 * CSRF defence: a state-changing request (and every WebSocket upgrade) must come from the allowed
 * origin — PUBLIC_URL when set, else the origin the request itself reached (its scheme and Host).
 * The comparison is exact on scheme, host and port, as hono's csrf middleware compares Origin with
 * `new URL(c.req.url).origin`. Origin is checked when present, else Referer; a request carrying
 * neither is refused (browsers send Origin on POST, PUT, DELETE and on WebSocket handshakes).
 */
export interface OriginRequest {
  origin: string | undefined | null;
  referer: string | undefined | null;
  /** `scheme://host[:port]` the request reached (http or https as the socket says, Host header). */
  selfOrigin: string | undefined | null;
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
  // Behind a TLS proxy the request reaches us as http: PUBLIC_URL names the one origin browsers use.
  const allowed = publicUrl ? originOf(publicUrl) : req.selfOrigin ? originOf(req.selfOrigin) : null;
  return allowed !== null && claimed === allowed;
}
