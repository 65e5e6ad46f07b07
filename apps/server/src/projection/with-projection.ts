/** An UpdateStore that tells the projector about every committed change (after the commit). */
import type { UpdateStore } from '../sync/contracts.js';
import type { Projector } from './projector.js';
import { createPendingByKey } from '../store/pending-by-key.js';

export function withProjection<S extends UpdateStore>(store: S, projector: Pick<Projector, 'notify' | 'flush' | 'close' | 'settleDoc'>): S {
  /** Appends not through yet, per document, including the projector's notice after the commit. */
  const inFlight = createPendingByKey();
  const wrapped: UpdateStore = {
    load: (docId) => store.load(docId),
    since: (docId, seq) => store.since(docId, seq),
    append(docId, update, userId) {
      return inFlight.track(
        docId,
        store.append(docId, update, userId).then((seq) => {
          projector.notify(docId);
          return seq;
        }),
      );
    },
    async flush() {
      await store.flush();
      await projector.flush();
    },
    async flushDoc(docId) {
      await inFlight.settled(docId);
      await (store.flushDoc ? store.flushDoc(docId) : store.flush());
      await projector.settleDoc(docId);
    },
    async close() {
      await store.flush();
      await projector.close();
      await store.close();
    },
  };
  // Keep the store's other members (stats(), compaction hooks) reachable.
  return Object.assign(Object.create(store) as S, wrapped);
}
