/**
 * Work still in flight, per key (a document id): what a per-document flush waits for. A promise is
 * tracked from `track` until it settles, either way; `settled(key)` waits for those tracked so far.
 */
export interface PendingByKey {
  track<T>(key: string, work: Promise<T>): Promise<T>;
  settled(key: string): Promise<void>;
}

export function createPendingByKey(): PendingByKey {
  const pending = new Map<string, Set<Promise<unknown>>>();
  return {
    track(key, work) {
      let own = pending.get(key);
      if (own === undefined) pending.set(key, (own = new Set()));
      own.add(work);
      const done = () => {
        own.delete(work);
        if (own.size === 0 && pending.get(key) === own) pending.delete(key);
      };
      work.then(done, done);
      return work;
    },
    async settled(key) {
      const own = pending.get(key);
      if (own !== undefined) await Promise.allSettled([...own]);
    },
  };
}
