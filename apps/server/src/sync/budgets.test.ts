/** The budget parts on their own (budgets.ts): token bucket (common practice), per-key counts, the commit queue's pause and resume. */
import { describe, expect, it } from 'vitest';
import { CommitQueueBudget, ConnectionCounts, TokenBucket, type Pausable } from './budgets.js';

describe('TokenBucket', () => {
  it('allows a burst, then the rate, and refills up to the burst only', () => {
    let now = 0;
    const bucket = new TokenBucket(10, 3, () => now);
    expect([bucket.take(), bucket.take(), bucket.take(), bucket.take()]).toEqual([true, true, true, false]);
    now += 100; // one token at 10 per second
    expect([bucket.take(), bucket.take()]).toEqual([true, false]);
    now += 60_000; // a long pause refills to the burst, not beyond
    expect(Array.from({ length: 4 }, () => bucket.take())).toEqual([true, true, true, false]);
  });
});

describe('ConnectionCounts', () => {
  it('counts per key up to the limit and frees a place on remove', () => {
    const counts = new ConnectionCounts(2);
    expect([counts.tryAdd('a'), counts.tryAdd('a'), counts.tryAdd('a'), counts.tryAdd('b')]).toEqual([true, true, false, true]);
    counts.remove('a');
    expect(counts.tryAdd('a')).toBe(true);
    counts.remove('a');
    counts.remove('a');
    counts.remove('b');
    expect(counts.keys).toBe(0);
  });
});

describe('CommitQueueBudget', () => {
  const recorder = (): Pausable & { log: string[] } => {
    const log: string[] = [];
    return { log, pauseReads: () => log.push('pause'), resumeReads: () => log.push('resume') };
  };

  it('pauses senders while deep (count), resumes them all at half, and bounds at twice the limit', () => {
    const budget = new CommitQueueBudget(4, 1_000_000);
    const a = recorder();
    const b = recorder();
    for (let i = 0; i < 3; i++) budget.add(10, a);
    expect(a.log).toEqual([]);
    budget.add(10, a); // the fourth makes it deep
    budget.add(10, b);
    budget.add(10, a); // already paused: not paused twice
    expect(a.log).toEqual(['pause']);
    expect(b.log).toEqual(['pause']);
    expect(budget.admits(10)).toBe(true);
    budget.add(10, null);
    budget.add(10, null);
    expect(budget.stats().queued).toBe(8);
    expect(budget.admits(10)).toBe(false);
    for (let i = 0; i < 5; i++) budget.done(10);
    expect(a.log).toEqual(['pause']); // 3 queued: not at half (2) yet
    budget.done(10);
    expect(a.log).toEqual(['pause', 'resume']);
    expect(b.log).toEqual(['pause', 'resume']);
    expect(budget.stats()).toEqual({ queued: 2, queuedBytes: 20, pausedSenders: 0 });
  });

  it('counts bytes as well, and a forgotten sender is not resumed', () => {
    const budget = new CommitQueueBudget(1_000, 100);
    const a = recorder();
    budget.add(100, a);
    expect(budget.deep).toBe(true);
    expect(a.log).toEqual(['pause']);
    expect(budget.admits(100)).toBe(true);
    expect(budget.admits(101)).toBe(false);
    budget.forget(a);
    budget.done(100);
    expect(a.log).toEqual(['pause']);
  });
});
