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
    case 'turn-down': {
      // plain: to the next turn's start; with Shift: by whole turns (the rest of this one, then the next)
      const i = turnAt(turns, sel.head);
      if (extend) head = sel.head < (t?.end ?? 0) ? t!.end : turns[Math.min(turns.length - 1, i + 1)]?.end ?? head;
      else head = turns[Math.min(turns.length - 1, i + 1)]?.start ?? head;
      break;
    }
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

/** The whole turn holding `offset`, its words only. */
export function turnSelection(turns: readonly TurnSpan[], offset: number): Sel | null {
  const t = turns[turnAt(turns, offset)];
  return t ? { anchor: t.start, head: t.end } : null;
}

/**
 * The sentence holding `offset`, by the Unicode sentence boundaries of UAX #29 (Intl.Segmenter), inside
 * its turn; without its trailing spaces.
 */
export function sentenceSelection(text: string, turns: readonly TurnSpan[], offset: number): Sel | null {
  const t = turns[turnAt(turns, offset)];
  if (!t) return null;
  const words = text.slice(t.start, t.end);
  const at = Math.max(0, Math.min(words.length - 1, offset - t.start));
  for (const seg of new Intl.Segmenter('en', { granularity: 'sentence' }).segment(words)) {
    if (at >= seg.index && at < seg.index + seg.segment.length) {
      const body = seg.segment.replace(/\s+$/u, '');
      return { anchor: t.start + seg.index, head: t.start + seg.index + body.length };
    }
  }
  return null;
}
