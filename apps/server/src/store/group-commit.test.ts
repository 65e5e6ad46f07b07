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
  it('waits before a commit that follows another closely, so later arrivals join it', async () => {
    const batches: number[][] = [];
    const group = new GroupCommit<number, number>(async (items) => (batches.push(items), items), 100, 200, 60_000);
    await group.submit(1); // idle: committed at once
    const second = group.submit(2); // busy now: this commit waits 200 ms …
    await new Promise((resolve) => setImmediate(resolve)); // (the drain has started and is waiting)
    const third = group.submit(3); // … so this one arrives in time to share it
    await Promise.all([second, third]);
    expect(batches).toEqual([[1], [2, 3]]);
  });
});
