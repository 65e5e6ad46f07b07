/** An in-memory UpdateStore for protocol tests and the in-memory bench reference; not durable. */
import type { UpdateStore } from '../sync/contracts.js';

export function createMemoryUpdateStore(): UpdateStore & { rows(docId: string): Uint8Array[] } {
  const logs = new Map<string, Array<{ seq: number; data: Uint8Array }>>();
  let nextSeq = 1;
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
      const seq = nextSeq++;
      log(docId).push({ seq, data: update.slice() });
      return seq;
    },
    flush: async () => {},
    close: async () => {},
    rows: (docId) => log(docId).map((entry) => entry.data),
  };
}
