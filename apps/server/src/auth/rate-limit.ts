/**
 * Sign-in throttling. An attempt is checked against every limit that applies to it (email+address,
 * email, address) and, when all allow it, recorded against each of them in the same synchronous step:
 * parallel guesses cannot all pass a check made before any of them is recorded. A successful attempt
 * is refunded afterwards; a failed one stays counted for the window (sliding).
 *
 * Memory is bounded (`maxKeys` tracked keys) without forgetting: when the table is full, expired keys
 * are swept, and if it is still full an attempt on a new key is refused as "busy" rather than evicting
 * someone's tracked failures — a spray of fresh keys cannot empty the limiter.
 * In memory per node: with several nodes the limit is per node, which still bounds guessing.
 */
export interface Limit {
  key: string;
  /** Attempts allowed within the window for this key. */
  max: number;
}

export type Begun =
  | {
      allowed: true;
      /** The attempt succeeded: refund it everywhere and forget `clear` keys (the email+address pair). */
      succeeded(clear?: readonly string[]): void;
    }
  | { allowed: false; retryAfter: number; reason: 'limit' | 'busy' };

export interface RateLimiter {
  begin(limits: readonly Limit[]): Begun;
  /** Keys tracked now (for tests and logs). */
  size(): number;
}

export interface RateLimiterOptions {
  windowMs: number;
  /** Most keys tracked at once; default 100,000 (about 10 MB). */
  maxKeys?: number;
  now?: () => number;
  /** Called when an attempt is refused because the table is full. */
  onBusy?: () => void;
}

export function createRateLimiter({ windowMs, maxKeys = 100_000, now = Date.now, onBusy }: RateLimiterOptions): RateLimiter {
  const attempts = new Map<string, number[]>();
  let lastSweep = -Infinity;

  const recent = (key: string): number[] => {
    const list = attempts.get(key);
    if (!list) return [];
    const cutoff = now() - windowMs;
    let drop = 0;
    while (drop < list.length && list[drop]! <= cutoff) drop++;
    if (drop > 0) list.splice(0, drop);
    if (list.length === 0) attempts.delete(key);
    return list;
  };

  // A full sweep is O(keys): at most once per second, so a spray cannot make every attempt pay for one.
  const sweep = () => {
    if (now() - lastSweep < 1000) return;
    lastSweep = now();
    for (const key of [...attempts.keys()]) recent(key);
  };

  return {
    begin(limits) {
      let wait = 0;
      for (const { key, max } of limits) {
        const list = recent(key);
        if (list.length >= max) wait = Math.max(wait, Math.ceil((list[list.length - max]! + windowMs - now()) / 1000), 1);
      }
      if (wait > 0) return { allowed: false, retryAfter: wait, reason: 'limit' };
      const fresh = limits.filter((l) => !attempts.has(l.key)).length;
      if (attempts.size + fresh > maxKeys) sweep();
      if (attempts.size + fresh > maxKeys) {
        onBusy?.();
        return { allowed: false, retryAfter: Math.max(1, Math.ceil(windowMs / 1000 / 10)), reason: 'busy' };
      }
      const at = now();
      for (const { key } of limits) {
        const list = attempts.get(key);
        if (list) list.push(at);
        else attempts.set(key, [at]);
      }
      let settled = false;
      return {
        allowed: true,
        succeeded(clear = []) {
          if (settled) return;
          settled = true;
          for (const { key } of limits) {
            const list = attempts.get(key);
            const i = list ? list.lastIndexOf(at) : -1;
            if (i >= 0) list!.splice(i, 1);
            if (list && list.length === 0) attempts.delete(key);
          }
          for (const key of clear) attempts.delete(key);
        },
      };
    },
    size: () => attempts.size,
  };
}
