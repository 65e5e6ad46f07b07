/**
 * HTTP and WebSocket helpers for integration tests: sign in, call the API as a browser on the
 * server's own origin would (cookie + Origin), and a ws class that sends the cookie and Origin so a
 * stock y-websocket client can authenticate.
 */
import { randomBytes } from 'node:crypto';
import { request } from 'node:http';

export interface ApiResponse<T = unknown> {
  status: number;
  headers: Headers;
  body: T;
}

export async function signIn(baseUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: baseUrl },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`);
  const cookie = sessionCookieFrom(res.headers);
  if (!cookie) throw new Error('sign-in answered 200 without a session cookie');
  return cookie;
}

/** `gloss_session=<token>` from a response's Set-Cookie headers, or null. */
export function sessionCookieFrom(headers: Headers): string | null {
  for (const line of headers.getSetCookie()) {
    const pair = line.split(';', 1)[0]!;
    if (pair.startsWith('gloss_session=') && pair.length > 'gloss_session='.length) return pair;
  }
  return null;
}

export interface ApiClient {
  call<T = unknown>(method: string, path: string, body?: unknown, extraHeaders?: Record<string, string>): Promise<ApiResponse<T>>;
}

/** Calls as a browser page of `baseUrl` would: its Origin on every request, the cookie when given. */
export function apiClient(baseUrl: string, cookie?: string): ApiClient {
  return {
    async call<T>(method: string, path: string, body?: unknown, extraHeaders: Record<string, string> = {}) {
      const headers: Record<string, string> = { origin: baseUrl, ...extraHeaders };
      if (cookie) headers.cookie = cookie;
      if (body !== undefined) headers['content-type'] ??= 'application/json';
      const res = await fetch(`${baseUrl}${path}`, {
        method,
        headers,
        body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
      });
      const text = await res.text();
      let parsed: unknown = text;
      try {
        parsed = text ? JSON.parse(text) : null;
      } catch {
        // not JSON; keep the text
      }
      return { status: res.status, headers: res.headers, body: parsed as T };
    },
  };
}

/**
 * A subclass of the given `ws` WebSocket class that adds headers (Cookie, Origin) to the handshake:
 * pass it as y-websocket's WebSocketPolyfill. (Taken as a parameter so this file needs no ws types.)
 */
type WsClass = new (address: string | URL, protocols?: string | string[], options?: { headers?: Record<string, string> }) => object;
export function webSocketWithHeaders<C extends WsClass>(Base: C, headers: Record<string, string>): C {
  const Base2 = Base as WsClass;
  return class extends Base2 {
    constructor(address: string | URL, protocols?: string | string[]) {
      super(address, protocols, { headers });
    }
  } as unknown as C;
}

/** Status of a WebSocket handshake for `/sync/<room>` (101 on success; the refusal status otherwise). */
export function upgradeStatus(baseUrl: string, room: string, headers: Record<string, string>): Promise<number> {
  const url = new URL(`/sync/${room}`, baseUrl);
  return new Promise((resolve, reject) => {
    const req = request(url, {
      headers: {
        connection: 'Upgrade',
        upgrade: 'websocket',
        'sec-websocket-version': '13',
        'sec-websocket-key': randomBytes(16).toString('base64'),
        ...headers,
      },
    });
    req.on('upgrade', (res, socket) => {
      socket.destroy();
      resolve(res.statusCode ?? 0);
    });
    req.on('response', (res) => {
      res.resume();
      resolve(res.statusCode ?? 0);
    });
    req.on('error', reject);
    req.end();
  });
}

