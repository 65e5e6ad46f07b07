/**
 * Keeps the projection current: `notify(docId)` after each committed change; per document, the work
 * is debounced (`delayMs` after the last change) and then run on one serial queue, so two rewrites of
 * the same rows never interleave. A failure is logged and the document is projected again on its next
 * change: projection never breaks sync.
 */
import type { Db } from '@gloss/db';
import type { DocLoader } from './load-doc.js';
import { projectDocument } from './write.js';

export interface ProjectorOptions {
  db: Db;
  store: DocLoader;
  /** Quiet time after a change before the document is projected (default 200 ms). */
  delayMs?: number;
  onError?: (err: unknown, docId: string) => void;
  /** The projection step itself; replaceable so the scheduling can be tested on its own. */
  project?: (docId: string) => Promise<void>;
}

export interface Projector {
  notify(docId: string): void;
  /** Projects everything noted so far, now, and resolves when the queue is empty. */
  flush(): Promise<void>;
  /** Projects these documents now (not waiting for the quiet time); resolves when they are done. */
  settle(docIds: readonly string[]): Promise<void>;
  /**
   * Projects this one document now if a change of it is waiting, and resolves when its own run is
   * done (runs queued after it are not waited for). A room's unload waits on this, not on flush().
   */
  settleDoc(docId: string): Promise<void>;
  /** Flushes, then ignores later notifications. */
  close(): Promise<void>;
  /** Documents projected so far (successfully). */
  readonly projected: number;
}

export function createProjector(o: ProjectorOptions): Projector {
  const delay = o.delayMs ?? 200;
  const project = o.project ?? ((id: string) => projectDocument(o.db, o.store, id));
  const timers = new Map<string, NodeJS.Timeout>();
  /**
   * When each waiting document's quiet time ends. A change moves this only; its timer, when it fires
   * early, waits out the rest. One timer per burst instead of a clearTimeout and a setTimeout per
   * committed update, which were on the relay's hot path (issue 11 profile).
   */
  const dueAt = new Map<string, number>();
  const queued = new Set<string>();
  /** Each document's latest run in the queue, until it has finished. */
  const runs = new Map<string, Promise<void>>();
  let queue: Promise<void> = Promise.resolve();
  let projected = 0;
  let closed = false;

  const enqueue = (docId: string) => {
    const t = timers.get(docId);
    if (t) clearTimeout(t);
    timers.delete(docId);
    dueAt.delete(docId);
    // Already waiting in the queue: that run will read the newest state anyway.
    if (queued.has(docId)) return;
    queued.add(docId);
    const run = queue.then(async () => {
      queued.delete(docId);
      try {
        await project(docId);
        projected++;
      } catch (err) {
        o.onError?.(err, docId);
      }
    });
    queue = run;
    runs.set(docId, run);
    void run.then(() => {
      if (runs.get(docId) === run) runs.delete(docId);
    });
  };

  const arm = (docId: string, ms: number) => {
    const timer = setTimeout(() => {
      const left = (dueAt.get(docId) ?? 0) - performance.now();
      if (left > 0) arm(docId, left);
      else enqueue(docId);
    }, ms);
    timer.unref();
    timers.set(docId, timer);
  };

  return {
    notify(docId) {
      if (closed) return;
      dueAt.set(docId, performance.now() + delay);
      if (!timers.has(docId)) arm(docId, delay);
    },
    async flush() {
      // A change may arrive while we wait: loop until nothing is pending or queued.
      for (;;) {
        for (const id of [...timers.keys()]) enqueue(id);
        const seen = queue;
        await seen;
        if (seen === queue && timers.size === 0) return;
      }
    },
    async settle(docIds) {
      if (closed) return;
      for (const id of docIds) enqueue(id);
      await queue;
    },
    async settleDoc(docId) {
      if (timers.has(docId) && !closed) enqueue(docId);
      await runs.get(docId);
    },
    async close() {
      await this.flush();
      closed = true;
    },
    get projected() {
      return projected;
    },
  };
}
