/** Every failure leaves as `{"error":{"code","message"}}` with its status; unexpected ones are logged, not leaked. */
import type { Context } from 'hono';
import { HTTPException } from 'hono/http-exception';
import { HttpError } from '../errors.js';

export function errorBody(code: string, message: string, details?: unknown) {
  return { error: details === undefined ? { code, message } : { code, message, details } };
}

export function onError(log: (err: unknown) => void) {
  return (err: Error, c: Context) => {
    if (err instanceof HttpError) {
      for (const [k, v] of Object.entries(err.headers)) c.header(k, v);
      return c.json(errorBody(err.code, err.message, err.details), err.status);
    }
    if (err instanceof HTTPException) {
      // hono's own (body-limit, malformed requests).
      const status = err.status;
      const code = status === 413 ? 'body_too_large' : status < 500 ? 'bad_request' : 'internal';
      return c.json(errorBody(code, err.message || 'Bad request.'), status);
    }
    log(err);
    return c.json(errorBody('internal', 'Something went wrong on the server; nothing was changed by this request.'), 500);
  };
}

export function onNotFound(c: Context) {
  return c.json(errorBody('not_found', `No such endpoint: ${c.req.method} ${new URL(c.req.url).pathname}`), 404);
}
