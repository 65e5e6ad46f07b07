/**
 * An in-memory UpdateStore for protocol tests and the in-memory bench reference; not durable.
 * `holdCommits` and `failNextCommit` stand in for a database's lock and a failed INSERT, so the store
 * acceptance suite (acceptance-suite.ts) runs against it like against PGlite and PostgreSQL.
 */
import type { UpdateStore } from '../sync/contracts.js';
import { StoreError } from './errors.js';

export interface MemoryUpdateStore extends UpdateStore {
  rows(docId: string): Uint8Array[];
  /** Appends from now on wait (uncommitted, unseen) until the returned release is called. */
  holdCommits(): () => void;
  /** The next append fails as a failed commit would. */
  failNextCommit(): void;
}

export function createMemoryUpdateStore(): MemoryUpdateStore {
  const logs = new Map<string, Array<{ seq: number; data: Uint8Array }>>();
  let nextSeq = 1;
  let held: Promise<void> | null = null;
  let failNext = false;
  const log = (docId: string) => {
    let entries = logs.get(docId);
    if (entries === undefined) logs.set(docId, (entries = []));
    return entries;
  };
  const since = (docId: string, seq: number) => {
    const entries = log(docId).filter((entry) => entry.seq > seq);
    return { updates: entries.map((entry) => entry.data), seq: entries.at(-1)?.seq ?? seq, seqs: entries.map((entry) => entry.seq) };
  };
  return {
    load: async (docId) => since(docId, 0),
    since: async (docId, seq) => since(docId, seq),
    async append(docId, update) {
      const data = update.slice();
      if (failNext) {
        failNext = false;
        throw new StoreError('append-failed', 'commit failed (memory store, on request)');
      }
      while (held !== null) await held;
      const seq = nextSeq++;
      log(docId).push({ seq, data });
      return seq;
    },
    flush: async () => {
      while (held !== null) await held;
    },
    // One hold covers every document here, so one document's flush waits as the whole one does.
    flushDoc: async () => {
      while (held !== null) await held;
    },
    close: async () => {},
    rows: (docId) => log(docId).map((entry) => entry.data),
    holdCommits() {
      let release!: () => void;
      const gate = new Promise<void>((resolve) => (release = resolve));
      held = gate;
      return () => {
        if (held === gate) held = null;
        release();
      };
    },
    failNextCommit() {
      failNext = true;
    },
  };
}
