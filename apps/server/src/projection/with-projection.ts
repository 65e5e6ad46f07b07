/** An UpdateStore that tells the projector about every committed change (after the commit). */
import type { UpdateStore } from '../sync/contracts.js';
import type { Projector } from './projector.js';

export function withProjection<S extends UpdateStore>(store: S, projector: Pick<Projector, 'notify' | 'flush' | 'close'>): S {
  const wrapped: UpdateStore = {
    load: (docId) => store.load(docId),
    since: (docId, seq) => store.since(docId, seq),
    async append(docId, update, userId) {
      const seq = await store.append(docId, update, userId);
      projector.notify(docId);
      return seq;
    },
    async flush() {
      await store.flush();
      await projector.flush();
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
