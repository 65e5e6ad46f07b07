import { describe, expect, it } from 'vitest';
import { createRateLimiter } from './rate-limit.js';

describe('sign-in rate limiter (5 failures per 15 min, as the brief asks; common practice)', () => {
  it('allows five failures, refuses the sixth with the seconds until the oldest ages out', () => {
    let t = 1_000_000;
    const limiter = createRateLimiter(5, 15 * 60_000, () => t);
    for (let i = 0; i < 5; i++) {
      expect(limiter.retryAfter('a|ip')).toBe(0);
      limiter.fail('a|ip');
      t += 1000;
    }
    // Oldest failure at 1_000_000; window ends at 1_900_000; now 1_005_000 → 895 s.
    expect(limiter.retryAfter('a|ip')).toBe(895);
    expect(limiter.retryAfter('b|ip')).toBe(0);
    t = 1_000_000 + 15 * 60_000 + 1;
    expect(limiter.retryAfter('a|ip')).toBe(0);
  });

  it('forgets failures after a success', () => {
    const limiter = createRateLimiter(2, 60_000, () => 0);
    limiter.fail('k');
    limiter.fail('k');
    expect(limiter.retryAfter('k')).toBeGreaterThan(0);
    limiter.reset('k');
    expect(limiter.retryAfter('k')).toBe(0);
  });
});
