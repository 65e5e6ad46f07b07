/**
 * Middleware for heavy routes (after requireSession): the person's heavy-request limits
 * (heavy/limits.ts) answered with 429, Retry-After and words; the limit is held until the handler returns.
 */
import type { MiddlewareHandler } from 'hono';
import { HttpError } from '../errors.js';
import { inlineHeavy, type HeavyWork } from '../heavy/pool.js';
import type { AppDeps, AppEnv } from './context.js';

export function heavyRoute(deps: AppDeps): MiddlewareHandler<AppEnv> {
  return async (c, next) => {
    const begun = deps.heavyLimits?.begin(c.get('session').user.id);
    if (begun && !begun.allowed) {
      const message =
        begun.reason === 'at-once'
          ? `You already have reports, imports or exports running. Wait until one finishes, then try again (in about ${begun.retryAfter} s).`
          : `You have asked for many reports, imports and exports in the last minute. Try again in ${begun.retryAfter} s.`;
      throw new HttpError(429, 'rate_limited', message, { 'Retry-After': String(begun.retryAfter) });
    }
    try {
      await next();
    } finally {
      if (begun?.allowed) begun.done();
    }
  };
}

const inline = inlineHeavy();

/** The server's worker pool, or the same jobs in place where none runs (bare app tests). */
export const heavyOf = (deps: AppDeps): HeavyWork => deps.heavy ?? inline;
