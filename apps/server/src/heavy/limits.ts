/**
 * Per-person limits on heavy requests (reports with bootstrap, file imports, exports): so many per
 * minute (sliding, auth/rate-limit.ts's limiter, never refunded) and so many running at once. Without
 * them one person could fill the worker pool's queue and make everyone else wait. In memory per node.
 */
import { createRateLimiter } from '../auth/rate-limit.js';

export type HeavyBegun = { allowed: true; done(): void } | { allowed: false; retryAfter: number; reason: 'per-minute' | 'at-once' };

export interface HeavyLimits {
  begin(userId: string): HeavyBegun;
}

export interface HeavyLimitOptions {
  perMinute: number;
  atOnce: number;
  now?: () => number;
}

/** How long to suggest waiting when someone already has `atOnce` heavy requests running. */
const AT_ONCE_RETRY_S = 5;

export function createHeavyLimits({ perMinute, atOnce, now }: HeavyLimitOptions): HeavyLimits {
  const perMinuteLimiter = createRateLimiter({ windowMs: 60_000, ...(now ? { now } : {}) });
  const running = new Map<string, number>();
  return {
    begin(userId) {
      const n = running.get(userId) ?? 0;
      if (n >= atOnce) return { allowed: false, retryAfter: AT_ONCE_RETRY_S, reason: 'at-once' };
      const begun = perMinuteLimiter.begin([{ key: userId, max: perMinute }]);
      if (!begun.allowed) return { allowed: false, retryAfter: begun.retryAfter, reason: 'per-minute' };
      running.set(userId, n + 1);
      let finished = false;
      return {
        allowed: true,
        done() {
          if (finished) return;
          finished = true;
          const left = (running.get(userId) ?? 1) - 1;
          if (left > 0) running.set(userId, left);
          else running.delete(userId);
        },
      };
    },
  };
}
