/**
 * Keyboard selection over the transcript (pure): the transcript is read-only, so Gloss keeps its own
 * selection {anchor, head} in character offsets and moves it by word or by turn.
 */
import { turnIndexAt } from '@gloss/model';

export interface Sel { anchor: number; head: number }
export interface TurnSpan { start: number; end: number }

const isWord = (c: string | undefined) => c !== undefined && /[\p{L}\p{N}'’-]/u.test(c);

/** Offset just past the end of the next word at or after `from`. */
export function nextWordEnd(text: string, from: number): number {
  let i = from;
  while (i < text.length && !isWord(text[i])) i++;
  while (i < text.length && isWord(text[i])) i++;
  return i;
}

/** Offset of the start of the word before `from`. */
export function prevWordStart(text: string, from: number): number {
  let i = from;
  while (i > 0 && !isWord(text[i - 1])) i--;
  while (i > 0 && isWord(text[i - 1])) i--;
  return i;
}

export type Move = 'word-right' | 'word-left' | 'turn-down' | 'turn-up' | 'turn-start' | 'turn-end';

/** The turn holding `offset`; the first turn for offsets before it. */
function turnAt(turns: readonly TurnSpan[], offset: number): number {
  return Math.max(0, turnIndexAt(turns, offset));
}

export function move(text: string, turns: readonly TurnSpan[], sel: Sel, how: Move, extend: boolean): Sel {
  const t = turns[turnAt(turns, sel.head)];
  let head = sel.head;
  switch (how) {
    case 'word-right': head = nextWordEnd(text, sel.head); break;
    case 'word-left': head = prevWordStart(text, sel.head); break;
    case 'turn-down': head = turns[Math.min(turns.length - 1, turnAt(turns, sel.head) + 1)]?.start ?? head; break;
    case 'turn-up': {
      const i = turnAt(turns, sel.head);
      head = sel.head > (t?.start ?? 0) ? t!.start : turns[Math.max(0, i - 1)]?.start ?? 0;
      break;
    }
    case 'turn-start': head = t?.start ?? 0; break;
    case 'turn-end': head = t?.end ?? text.length; break;
  }
  head = Math.max(0, Math.min(text.length, head));
  // Without Shift the first word move selects the word itself, so one key press gives something to code.
  if (!extend && how === 'word-right') return { anchor: prevWordStart(text, head), head };
  return extend ? { anchor: sel.anchor, head } : { anchor: head, head };
}

export function ordered(sel: Sel): { start: number; end: number } {
  return sel.anchor <= sel.head ? { start: sel.anchor, end: sel.head } : { start: sel.head, end: sel.anchor };
}
