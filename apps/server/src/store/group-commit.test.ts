/** Group commit semantics (common practice, as in PostgreSQL's own commit_delay grouping): what arrives during a commit goes in the next one. */
import { describe, expect, it } from 'vitest';
import { GroupCommit } from './group-commit.js';

describe('GroupCommit', () => {
  it('puts items that arrive during a commit into the next batch, in order', async () => {
    const batches: number[][] = [];
    let release!: () => void;
    let gate = new Promise<void>((resolve) => (release = resolve));
    const group = new GroupCommit<number, number>(async (items) => {
      batches.push(items);
      await gate;
      return items.map((i) => i * 10);
    }, 100);
    const first = group.submit(1);
    await Promise.resolve(); // the first commit starts
    await Promise.resolve();
    const rest = [2, 3, 4].map((i) => group.submit(i));
    gate = Promise.resolve();
    release();
    expect(await first).toBe(10);
    expect(await Promise.all(rest)).toEqual([20, 30, 40]);
    expect(batches).toEqual([[1], [2, 3, 4]]);
  });

  it('caps batches at maxBatch and rejects only the failed batch', async () => {
    const batches: number[][] = [];
    const group = new GroupCommit<number, number>(async (items) => {
      batches.push(items);
      if (items.includes(3)) throw new Error('disk full');
      return items;
    }, 2);
    const results = await Promise.allSettled([1, 2, 3, 4, 5].map((i) => group.submit(i)));
    expect(batches).toEqual([[1, 2], [3, 4], [5]]);
    expect(results.map((r) => r.status)).toEqual(['fulfilled', 'fulfilled', 'rejected', 'rejected', 'fulfilled']);
    await group.flush();
    expect(group.pending).toBe(0);
  });
});

describe('GroupCommit with a commit delay', () => {
  it('waits before a commit while items arrive faster than the delay, so later arrivals join it', async () => {
    const batches: number[][] = [];
    let clock = 0;
    const group = new GroupCommit<number, number>(async (items) => (batches.push(items), items), 100, 200, () => clock);
    await group.submit(1); // nothing known about the rate yet: committed at once
    clock += 1; // the next arrives 1 ms later: a stream far denser than one per 200 ms
    const second = group.submit(2); // so this commit waits 200 ms …
    await new Promise((resolve) => setImmediate(resolve)); // (the drain has started and is waiting)
    const third = group.submit(3); // … and this one arrives in time to share it
    await Promise.all([second, third]);
    expect(batches).toEqual([[1], [2, 3]]);
  });

  it('does not wait when items arrive more sparsely than the delay (the wait would gather nothing)', async () => {
    const batches: number[][] = [];
    let clock = 0;
    // A delay of a minute: were it ever taken, this test would time out.
    const group = new GroupCommit<number, number>(async (items) => (batches.push(items), items), 100, 60_000, () => clock);
    for (const i of [1, 2, 3]) {
      clock += 3_600_000; // one item an hour
      await group.submit(i);
    }
    expect(batches).toEqual([[1], [2], [3]]);
  });
});
