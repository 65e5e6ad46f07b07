/**
 * `Y.mergeUpdates` on a thread of its own, for compaction. Merging a document's snapshot with its log
 * took ~105 ms of the event loop on a busy text (issue 11 profile, 50 editors): every room on the node
 * waited behind it. The thread starts on the first merge and ends after `idleMs` without one.
 */
import { Worker } from 'node:worker_threads';
import { StoreError } from './errors.js';

export interface Merger {
  merge(parts: readonly Uint8Array[]): Promise<Uint8Array>;
  close(): Promise<void>;
}

type Waiting = { resolve: (data: Uint8Array) => void; reject: (error: Error) => void };

export function mergeOffThread({ idleMs = 30_000 }: { idleMs?: number } = {}): Merger {
  let worker: Worker | null = null;
  let nextId = 0;
  let idle: NodeJS.Timeout | undefined;
  const waiting = new Map<number, Waiting>();

  const failAll = (error: Error) => {
    for (const w of waiting.values()) w.reject(error);
    waiting.clear();
  };

  function start(): Worker {
    const w = new Worker(new URL('./merge-worker.mjs', import.meta.url));
    w.unref();
    w.on('message', (m: { id: number; data?: Uint8Array; error?: string }) => {
      const entry = waiting.get(m.id);
      if (!entry) return;
      waiting.delete(m.id);
      if (m.data) entry.resolve(m.data);
      else entry.reject(new StoreError('compaction-failed', `merging the log failed: ${m.error}`));
      if (waiting.size === 0) armIdle();
    });
    w.on('error', (err) => failAll(new StoreError('compaction-failed', `the merge thread failed: ${String(err)}`, { cause: err })));
    w.on('exit', () => {
      if (worker === w) worker = null;
      failAll(new StoreError('compaction-failed', 'the merge thread ended'));
    });
    return w;
  }

  function armIdle(): void {
    clearTimeout(idle);
    idle = setTimeout(() => void worker?.terminate(), idleMs);
    idle.unref();
  }

  return {
    merge(parts) {
      clearTimeout(idle);
      worker ??= start();
      const id = nextId++;
      const w = worker;
      return new Promise<Uint8Array>((resolve, reject) => {
        waiting.set(id, { resolve, reject });
        // Copied, not transferred: the parts may be views into buffers the caller still holds.
        w.postMessage({ id, parts });
      });
    },
    async close() {
      clearTimeout(idle);
      const w = worker;
      worker = null;
      if (w) await w.terminate();
    },
  };
}
