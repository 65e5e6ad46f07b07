/**
 * When this person last opened each code's entry, and when they last looked at the codebook, kept per
 * study and person in localStorage: the "updated" marks and the codebook's "changed since you last
 * looked" list are read against them. Only a convenience: losing it shows marks again, nothing more.
 */
import { createSignal } from 'solid-js';

const read = (key: string): Record<string, number> => {
  try {
    const v = JSON.parse(localStorage.getItem(key) ?? '{}');
    return v && typeof v === 'object' ? v : {};
  } catch {
    return {};
  }
};
const write = (key: string, v: unknown) => {
  try {
    localStorage.setItem(key, JSON.stringify(v));
  } catch {
    // storage full or off: marks simply come back
  }
};

// one signal per key, shared by every screen of this page
const signals = new Map<string, ReturnType<typeof createSignal<Record<string, number>>>>();

export function useSeenCodes(studyId: string, userId: string) {
  const key = `gloss:seen-codes:${studyId}:${userId}`;
  let sig = signals.get(key);
  if (!sig) signals.set(key, (sig = createSignal(read(key))));
  const [seen, setSeen] = sig;
  return {
    /** When the person last opened the code (0: never). */
    seenAt: (codeId: string) => seen()[codeId] ?? 0,
    // Called from effects: the updater form reads the map without tracking it (reading `seen()` here
    // made the calling effect depend on the signal it sets, a loop without end).
    markSeen(codeId: string, at = Date.now()) {
      setSeen((prev) => {
        const next = { ...prev, [codeId]: at };
        write(key, next);
        return next;
      });
    },
  };
}

/** When the person last looked at the codebook screen (0: never), and a way to move it to now. */
export function codebookLooked(studyId: string, userId: string): { at: number; now(): void } {
  const key = `gloss:codebook-looked:${studyId}:${userId}`;
  const at = Number(localStorage.getItem(key) ?? 0) || 0;
  return { at, now: () => write(key, Date.now()) };
}
