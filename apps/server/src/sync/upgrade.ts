/** The HTTP side of a sync connection: which room, and may this request open it. */
import { STATUS_CODES, type IncomingMessage } from 'node:http';
import type { Duplex } from 'node:stream';

export const SYNC_PREFIX = '/sync/';

/** The room named by `/sync/<room>` (percent-decoded), or null when the path is not a sync path. */
export function roomFromUrl(url: string | undefined): string | null {
  if (url === undefined) return null;
  const path = url.split('?', 1)[0]!;
  if (!path.startsWith(SYNC_PREFIX)) return null;
  try {
    const room = decodeURIComponent(path.slice(SYNC_PREFIX.length));
    return room.length > 0 ? room : null;
  } catch {
    return null;
  }
}

/** The HTTP status carried by an authorizer's error (HttpError-like: `status` or `statusCode`), else 500. */
export function statusOf(error: unknown): number {
  if (typeof error === 'object' && error !== null) {
    const e = error as { status?: unknown; statusCode?: unknown };
    const status = typeof e.status === 'number' ? e.status : e.statusCode;
    if (typeof status === 'number' && status >= 400 && status < 600) return status;
  }
  return 500;
}

/** Answers a refused upgrade with a bare HTTP response and drops the socket. */
export function refuse(socket: Duplex, status: number): void {
  if (socket.destroyed) return;
  // Destroy only after the response has been flushed, or the client may see a bare reset.
  socket.end(`HTTP/1.1 ${status} ${STATUS_CODES[status] ?? 'Error'}\r\nConnection: close\r\nContent-Length: 0\r\n\r\n`, () =>
    socket.destroy(),
  );
}

export type { IncomingMessage };
