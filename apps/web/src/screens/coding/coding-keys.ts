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

/**
 * The key list shown on screen (the Keys button), each key with the control that does the same by
 * pointer, so the list itself says that nothing needs the keyboard.
 */
export const KEY_HELP: ReadonlyArray<{ keys: string; does: string; control: string }> = [
  { keys: '→ / ←', does: 'select the next / previous word (Shift extends)', control: 'drag over the words' },
  { keys: '↓ / ↑', does: 'cursor to the next / previous turn (Shift extends by whole turns)', control: 'click in a turn' },
  { keys: 't', does: 'select the whole turn at the cursor', control: 'Whole turn' },
  { keys: 's', does: 'select the sentence at the cursor', control: 'Sentence' },
  { keys: 'c or /', does: 'find a code, Enter applies it', control: 'the Find a code field; click a code' },
  { keys: '1–9', does: 'apply a recently used code', control: 'the numbered recent codes' },
  { keys: 'i', does: 'in vivo code from the selected words', control: 'In vivo code' },
  { keys: 'j', does: 'jotting on the selection', control: 'Jotting' },
  { keys: '[ / ]', does: 'previous / next segment', control: '◂ Segment / Segment ▸, or a code name under a turn' },
  { keys: 'r, n, Delete', does: 'recode, note, remove the chosen segment', control: 'Recode…, the note field, Remove' },
  { keys: 'Alt+→ / Alt+←', does: 'move the chosen segment’s end (Shift: its start)', control: 'end ⇥ / ⇤ end (⇤ start / start ⇥)' },
  { keys: 'Ctrl+Z / Ctrl+Shift+Z', does: 'undo / redo your own coding', control: 'Undo / Redo' },
  { keys: 'Escape', does: 'clear the selection and the chosen segment', control: 'Clear' },
  { keys: '?', does: 'show or hide this list', control: 'Keys' },
];
