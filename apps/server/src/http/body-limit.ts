/**
 * The request-body limit, answered with a 413 that reaches the client.
 *
 * hono's bodyLimit answers as soon as the limit is passed and leaves the rest of the body unread;
 * @hono/node-server then gives that rest 500 ms to drain and destroys the socket, and a client still
 * sending (a slow upload, or any upload on a busy machine) got a reset connection instead of "too
 * large". Here the refused body is read and thrown away first, bounded in bytes and time so that a
 * hostile client cannot hold the connection with it; past those bounds the answer says
 * `Connection: close`.
 */
import type { Context, MiddlewareHandler } from 'hono';
import { HttpError } from '../errors.js';

export interface DiscardLimits {
  maxBytes: number;
  timeoutMs: number;
}

const DEFAULT_DISCARD: DiscardLimits = { maxBytes: 64 * 1024 * 1024, timeoutMs: 10_000 };

export function limitBody(maxBytes: number, discard: DiscardLimits = DEFAULT_DISCARD): MiddlewareHandler {
  return async (c, next) => {
    const body = c.req.raw.body;
    if (!body) return next();
    const declared = c.req.raw.headers.get('content-length');
    if (declared !== null && !c.req.raw.headers.has('transfer-encoding')) {
      if (Number.parseInt(declared, 10) <= maxBytes) return next();
      return refuse(c, body.getReader(), maxBytes, discard);
    }
    // No declared length: read up to the limit, and hand the rest of the app a buffered body.
    const reader = body.getReader();
    const chunks: Uint8Array[] = [];
    let size = 0;
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > maxBytes) return refuse(c, reader, maxBytes, discard);
      chunks.push(value);
    }
    const buffer = new Uint8Array(size);
    let at = 0;
    for (const chunk of chunks) {
      buffer.set(chunk, at);
      at += chunk.byteLength;
    }
    c.req.raw = new Request(c.req.raw, { body: buffer });
    return next();
  };
}

async function refuse(c: Context, reader: ReadableStreamDefaultReader<Uint8Array>, maxBytes: number, limits: DiscardLimits): Promise<never> {
  if (!(await discardRest(reader, limits))) c.header('Connection', 'close');
  throw new HttpError(413, 'body_too_large', `The body is larger than ${maxBytes} bytes.`);
}

/** Reads to the end of the stream within the limits; false when they ran out (the stream is cancelled). */
export async function discardRest(reader: ReadableStreamDefaultReader<Uint8Array>, { maxBytes, timeoutMs }: DiscardLimits): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<'timeout'>((resolve) => {
    timer = setTimeout(() => resolve('timeout'), timeoutMs);
  });
  try {
    let read = 0;
    for (;;) {
      const next = await Promise.race([reader.read(), timeout]);
      if (next === 'timeout') break;
      if (next.done) return true;
      read += next.value.byteLength;
      if (read > maxBytes) break;
    }
  } catch {
    // The client went away mid-body: nothing left to read, and nobody to answer.
    return false;
  } finally {
    clearTimeout(timer);
  }
  await reader.cancel().catch(() => undefined);
  return false;
}
