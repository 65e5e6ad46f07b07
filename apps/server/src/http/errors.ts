/** Every failure leaves as `{"error":{"code","message"}}` with its status; unexpected ones are logged, not leaked. */
import type { Context } from 'hono';
import { HTTPException } from 'hono/http-exception';
import { HttpError } from '../errors.js';
import { HeavyError } from '../heavy/errors.js';
import { AdminError, type AdminErrorCode } from '../admin/errors.js';

export function errorBody(code: string, message: string, details?: unknown) {
  return { error: details === undefined ? { code, message } : { code, message, details } };
}

export function onError(log: (err: unknown) => void) {
  return (err: Error, c: Context) => {
    if (err instanceof HttpError) {
      for (const [k, v] of Object.entries(err.headers)) c.header(k, v);
      return c.json(errorBody(err.code, err.message, err.details), err.status);
    }
    if (err instanceof AdminError) {
      const { status, code } = ADMIN_STATUS[err.code];
      return c.json(errorBody(code, err.message, err.details), status);
    }
    if (err instanceof HeavyError) {
      const { status, retryAfter } = heavyStatus(err);
      if (status === 500) log(err);
      if (retryAfter) c.header('Retry-After', String(retryAfter));
      return c.json(errorBody(err.code, err.message), status);
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

/** The admin operations' failures as HTTP answers (the wire codes clients already know). */
export const ADMIN_STATUS: Record<AdminErrorCode, { status: 400 | 404 | 409 | 410; code: string }> = {
  invalid_input: { status: 400, code: 'invalid_body' },
  not_found: { status: 404, code: 'not_found' },
  conflict: { status: 409, code: 'conflict' },
  last_owner: { status: 409, code: 'last_owner' },
  link_used: { status: 410, code: 'link_used' },
  link_expired: { status: 410, code: 'link_expired' },
};

/** Heavy work that did not finish: busy or too slow is "try again later", too big is the input's fault. */
export function heavyStatus(err: HeavyError): { status: 413 | 500 | 503; retryAfter?: number } {
  switch (err.code) {
    case 'busy':
      return { status: 503, retryAfter: 30 };
    case 'timed_out':
      return { status: 503, retryAfter: 60 };
    case 'out_of_memory':
      return { status: 413 };
    case 'failed':
      return { status: 500 };
  }
}

export function onNotFound(c: Context) {
  return c.json(errorBody('not_found', `No such endpoint: ${c.req.method} ${new URL(c.req.url).pathname}`), 404);
}
