/**
 * What the server still waits for before it is ready (the demo being seeded, sync being attached).
 * Until nothing is pending, /api/health answers 503 naming what is pending, the rest of the API answers
 * 503 `not_ready`, and sync upgrades are refused with 503: nobody signs in to a half-seeded database.
 */
export interface Readiness {
  /** Marks `what` (plain words, e.g. "demo study seeding") as pending; call the returned function when it is done. */
  wait(what: string): () => void;
  /** What is still pending, in the order it was registered (empty when ready). */
  pending(): string[];
  ready(): boolean;
}

export function createReadiness(): Readiness {
  const pending = new Map<symbol, string>();
  return {
    wait(what) {
      const key = Symbol(what);
      pending.set(key, what);
      return () => void pending.delete(key);
    },
    pending: () => [...pending.values()],
    ready: () => pending.size === 0,
  };
}
