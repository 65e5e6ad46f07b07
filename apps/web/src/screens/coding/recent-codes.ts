/** The codes this person applied most recently (digits 1–9 apply them), kept per study in localStorage. */
import { createSignal } from 'solid-js';

export function useRecentCodes(studyId: string) {
  const key = `gloss:recent:${studyId}`;
  const load = (): string[] => {
    try {
      const v = JSON.parse(localStorage.getItem(key) ?? '[]');
      return Array.isArray(v) ? v.filter((x): x is string => typeof x === 'string') : [];
    } catch {
      return [];
    }
  };
  const [recent, setRecent] = createSignal<string[]>(load());
  const use = (codeId: string) => {
    const next = [codeId, ...recent().filter((c) => c !== codeId)].slice(0, 9);
    setRecent(next);
    try {
      localStorage.setItem(key, JSON.stringify(next));
    } catch {
      // only a convenience
    }
  };
  return { recent, use };
}
