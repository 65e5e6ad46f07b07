/**
 * The coding view's keyboard commands (pure): a key event becomes a command name. Each command also
 * has a button, so nothing needs the keyboard and nothing needs the mouse.
 */
export type Command =
  | { do: 'find-code' }
  | { do: 'recent'; n: number }
  | { do: 'in-vivo' }
  | { do: 'jotting' }
  | { do: 'next-segment' }
  | { do: 'prev-segment' }
  | { do: 'remove' }
  | { do: 'recode' }
  | { do: 'note' }
  | { do: 'undo' }
  | { do: 'redo' }
  | { do: 'clear' }
  | { do: 'keys' }
  | { do: 'select-turn' }
  | { do: 'select-sentence' }
  | { do: 'resize'; edge: 'start' | 'end'; dir: 1 | -1 };

export interface KeyLike { key: string; ctrlKey: boolean; metaKey: boolean; altKey: boolean; shiftKey: boolean }

export function commandFor(e: KeyLike): Command | null {
  const mod = e.ctrlKey || e.metaKey;
  if (mod && !e.altKey) {
    const k = e.key.toLowerCase();
    if (k === 'z') return { do: e.shiftKey ? 'redo' : 'undo' };
    if (k === 'y') return { do: 'redo' };
    return null;
  }
  if (e.altKey && (e.key === 'ArrowRight' || e.key === 'ArrowLeft')) {
    return { do: 'resize', edge: e.shiftKey ? 'start' : 'end', dir: e.key === 'ArrowRight' ? 1 : -1 };
  }
  if (e.altKey || mod) return null;
  if (/^[1-9]$/.test(e.key)) return { do: 'recent', n: Number(e.key) };
  switch (e.key) {
    case '/': case 'c': return { do: 'find-code' };
    case 'i': return { do: 'in-vivo' };
    case 'j': return { do: 'jotting' };
    case ']': return { do: 'next-segment' };
    case '[': return { do: 'prev-segment' };
    case 'Delete': case 'Backspace': return { do: 'remove' };
    case 'r': return { do: 'recode' };
    case 'n': return { do: 'note' };
    case 'Escape': return { do: 'clear' };
    case '?': return { do: 'keys' };
    case 't': return { do: 'select-turn' };
    case 's': return { do: 'select-sentence' };
  }
  return null;
}

/** The key list shown on screen (and read by screen readers via aria-describedby). */
export const KEY_HELP: Array<[string, string]> = [
  ['→ / ←', 'select the next / previous word (Shift extends)'],
  ['↓ / ↑', 'cursor to the next / previous turn (Shift extends by whole turns)'],
  ['t', 'select the whole turn at the cursor'],
  ['s', 'select the sentence at the cursor'],
  ['c or /', 'find a code, Enter applies it'],
  ['1–9', 'apply a recently used code'],
  ['i', 'in vivo code from the selected words'],
  ['j', 'jotting on the selection'],
  ['[ / ]', 'previous / next segment'],
  ['r, n, Delete', 'recode, note, remove the chosen segment'],
  ['Alt+→ / Alt+←', 'move the chosen segment’s end (Shift: its start)'],
  ['Ctrl+Z / Ctrl+Shift+Z', 'undo / redo your own coding'],
  ['?', 'show or hide this list (the Keys button)'],
];
