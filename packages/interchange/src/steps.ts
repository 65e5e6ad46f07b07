/**
 * A long parse written as a generator that pauses every so often. Run it straight through
 * (`runSync`, for pure callers) or let other work run at each pause (`runAsync`), so a server
 * importing a large file keeps serving its other clients and can send progress as it goes.
 */
export type Steps<T> = Generator<void, T, void>;

/** Lines (or cues) handled between pauses. */
export const STEP_SIZE = 4096;

export function runSync<T>(steps: Steps<T>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}

const pause: () => Promise<void> =
  typeof setImmediate === 'function' ? () => new Promise((res) => setImmediate(res)) : () => new Promise((res) => setTimeout(res, 0));

export async function runAsync<T>(steps: Steps<T>): Promise<T> {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
    await pause();
  }
}
