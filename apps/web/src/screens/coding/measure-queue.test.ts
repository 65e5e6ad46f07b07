// Reads before writes in one frame: the usual cure for forced synchronous layout (common practice;
// browsers recompute layout when a read follows a write, as the HTML/CSSOM "update the rendering" steps imply).
import { describe, expect, it } from 'vitest';
import { createMeasureQueue } from './measure-queue.js';

function manualFrames() {
  const pending = new Map<number, () => void>();
  let next = 1;
  return {
    request: (f: () => void) => (pending.set(next, f), next++),
    cancel: (id: number) => void pending.delete(id),
    run() {
      const fs = [...pending.values()];
      pending.clear();
      fs.forEach((f) => f());
    },
    get count() { return pending.size; },
  };
}

describe('createMeasureQueue', () => {
  it('runs every read of a frame before any write, in one frame', () => {
    const frames = manualFrames();
    const q = createMeasureQueue(frames.request, frames.cancel);
    const log: string[] = [];
    for (const k of ['a', 'b', 'c']) q.schedule({ k }, () => { log.push(`read ${k}`); return () => log.push(`write ${k}`); });
    expect(frames.count).toBe(1);
    expect(log).toEqual([]);
    frames.run();
    expect(log).toEqual(['read a', 'read b', 'read c', 'write a', 'write b', 'write c']);
  });

  it('keeps only the latest job per key, drops cancelled ones, and runs nothing after dispose', () => {
    const frames = manualFrames();
    const q = createMeasureQueue(frames.request, frames.cancel);
    const log: string[] = [];
    const row = {};
    const other = {};
    q.schedule(row, () => void log.push('old'));
    q.schedule(row, () => void log.push('new'));
    q.schedule(other, () => void log.push('other'));
    q.cancel(other);
    frames.run();
    expect(log).toEqual(['new']);
    q.schedule(row, () => void log.push('late'));
    q.dispose();
    frames.run();
    expect(log).toEqual(['new']);
  });
});
