import { describe, expect, it } from 'vitest';
import { createRateLimiter } from './rate-limit.js';

// The limits themselves (5 per email and address in 15 min) are the brief's; sliding windows,
// check-and-record in one step and not evicting under pressure are common practice for login throttles.
describe('sign-in rate limiter', () => {
  it('allows `max` attempts in the window, refuses the next with the seconds until the oldest ages out', () => {
    let t = 1_000_000;
    const limiter = createRateLimiter({ windowMs: 15 * 60_000, now: () => t });
    const limits = [{ key: 'a|ip', max: 5 }];
    for (let i = 0; i < 5; i++) {
      expect(limiter.begin(limits).allowed).toBe(true);
      t += 1000;
    }
    // Oldest attempt at 1_000_000; window ends at 1_900_000; now 1_005_000 → 895 s.
    expect(limiter.begin(limits)).toEqual({ allowed: false, retryAfter: 895, reason: 'limit' });
    expect(limiter.begin([{ key: 'b|ip', max: 5 }]).allowed).toBe(true);
    t = 1_000_000 + 15 * 60_000 + 1;
    expect(limiter.begin(limits).allowed).toBe(true);
  });

  it('records an attempt in the same step that checks it: parallel attempts cannot all pass', async () => {
    const limiter = createRateLimiter({ windowMs: 60_000 });
    // Twenty attempts begun before any of them finishes (each then awaits, as a password check does).
    const outcomes = await Promise.all(
      Array.from({ length: 20 }, async () => {
        const begun = limiter.begin([{ key: 'pair', max: 5 }]);
        await new Promise((r) => setImmediate(r));
        return begun.allowed;
      }),
    );
    expect(outcomes.filter(Boolean)).toHaveLength(5);
  });

  it('checks every limit: the address limit stops a spray of emails from one address', () => {
    const limiter = createRateLimiter({ windowMs: 60_000, now: () => 0 });
    const attempt = (email: string) => limiter.begin([{ key: `pair|${email}|ip`, max: 5 }, { key: 'addr|ip', max: 3 }]);
    expect([attempt('a').allowed, attempt('b').allowed, attempt('c').allowed]).toEqual([true, true, true]);
    expect(attempt('d')).toMatchObject({ allowed: false, reason: 'limit' });
  });

  it('refunds a successful attempt and forgets the keys it is told to', () => {
    const limiter = createRateLimiter({ windowMs: 60_000, now: () => 0 });
    const limits = [{ key: 'pair', max: 2 }, { key: 'addr', max: 3 }];
    limiter.begin(limits);
    limiter.begin(limits);
    expect(limiter.begin(limits).allowed).toBe(false);
    const ok = limiter.begin([{ key: 'addr', max: 3 }]);
    expect(ok.allowed).toBe(true);
    if (ok.allowed) {
      ok.succeeded();
      ok.succeeded(); // twice refunds once
    }
    expect(limiter.begin([{ key: 'addr', max: 3 }]).allowed).toBe(true); // the refund left room for exactly one
    expect(limiter.begin([{ key: 'addr', max: 3 }]).allowed).toBe(false);
  });

  it('a spray of fresh keys cannot evict tracked failures: when full, new keys are refused as busy', () => {
    let t = 0;
    let busy = 0;
    const limiter = createRateLimiter({ windowMs: 60_000, maxKeys: 10, now: () => t, onBusy: () => busy++ });
    for (let i = 0; i < 3; i++) limiter.begin([{ key: 'victim', max: 3 }]);
    for (let i = 0; i < 100; i++) limiter.begin([{ key: `spray-${i}`, max: 3 }]);
    expect(limiter.size()).toBe(10);
    expect(busy).toBe(91);
    expect(limiter.begin([{ key: 'victim', max: 3 }])).toMatchObject({ allowed: false, reason: 'limit' });
    expect(limiter.begin([{ key: 'newcomer', max: 3 }])).toMatchObject({ allowed: false, reason: 'busy' });
    // Once the window has passed, the sweep frees the table.
    t = 60_001;
    expect(limiter.begin([{ key: 'newcomer', max: 3 }]).allowed).toBe(true);
    expect(limiter.size()).toBe(1);
  });
});
