/**
 * Sign-in throttling: at most `maxFailures` failed attempts per key (email + client address) within
 * a sliding window; after that, refusals carry the seconds until the oldest failure ages out.
 * In memory per node: with several nodes the limit is per node, which still bounds guessing.
 */
export interface RateLimiter {
  /** Seconds to wait, or 0 when an attempt is allowed now. */
  retryAfter(key: string): number;
  fail(key: string): void;
  reset(key: string): void;
}

export function createRateLimiter(maxFailures: number, windowMs: number, now: () => number = Date.now): RateLimiter {
  const failures = new Map<string, number[]>();
  const recent = (key: string): number[] => {
    const cutoff = now() - windowMs;
    const list = (failures.get(key) ?? []).filter((t) => t > cutoff);
    if (list.length) failures.set(key, list);
    else failures.delete(key);
    return list;
  };
  return {
    retryAfter(key) {
      const list = recent(key);
      if (list.length < maxFailures) return 0;
      const oldestCounted = list[list.length - maxFailures]!;
      return Math.max(1, Math.ceil((oldestCounted + windowMs - now()) / 1000));
    },
    fail(key) {
      const list = recent(key);
      list.push(now());
      failures.set(key, list);
      // Bound memory under a spray of distinct keys.
      if (failures.size > 100_000) failures.delete(failures.keys().next().value!);
    },
    reset(key) {
      failures.delete(key);
    },
  };
}
