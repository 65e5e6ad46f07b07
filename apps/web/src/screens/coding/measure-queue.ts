/**
 * Layout reads batched before writes. Each turn near the viewport measures where its segments' words
 * sit and then moves its bars; done turn by turn, every read after another turn's write forces a fresh
 * layout of the whole transcript. Here all reads of a frame run first, then all writes in one batch.
 * A job scheduled again before its frame replaces the earlier one (one measurement per turn per frame).
 */
import { batch } from 'solid-js';

/** Reads the layout and returns what to write (or nothing). */
export type MeasureJob = () => (() => void) | void;

export interface MeasureQueue {
  schedule(key: object, job: MeasureJob): void;
  cancel(key: object): void;
  dispose(): void;
}

export function createMeasureQueue(
  requestFrame: (f: () => void) => number = (f) => requestAnimationFrame(f),
  cancelFrame: (id: number) => void = (id) => cancelAnimationFrame(id),
): MeasureQueue {
  const jobs = new Map<object, MeasureJob>();
  let frame = 0;
  const flush = () => {
    frame = 0;
    const list = [...jobs.values()];
    jobs.clear();
    const writes: Array<() => void> = [];
    for (const job of list) {
      const w = job();
      if (w) writes.push(w);
    }
    batch(() => writes.forEach((w) => w()));
  };
  return {
    schedule(key, job) {
      jobs.set(key, job);
      if (frame === 0) frame = requestFrame(flush);
    },
    cancel(key) {
      jobs.delete(key);
    },
    dispose() {
      jobs.clear();
      if (frame !== 0) cancelFrame(frame);
      frame = 0;
    },
  };
}
