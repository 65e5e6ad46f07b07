// Keyboard selection by word and turn: hand-worked cases (common practice for word-wise caret movement).
import { describe, expect, it } from 'vitest';
import { move, nextWordEnd, ordered, prevWordStart, sentenceSelection, turnSelection } from './keyboard-selection.js';

const text = 'We met at the hall.\nIt rained all week.';
const turns = [{ start: 0, end: 19 }, { start: 20, end: 39 }];

describe('keyboard selection', () => {
  it('finds word edges, skipping punctuation and spaces', () => {
    expect(nextWordEnd(text, 0)).toBe(2);
    expect(nextWordEnd(text, 2)).toBe(6);
    expect(prevWordStart(text, 6)).toBe(3);
    expect(prevWordStart(text, 19)).toBe(14);
  });

  it('selects the next word on a plain move and extends on shift', () => {
    const one = move(text, turns, { anchor: 0, head: 0 }, 'word-right', false);
    expect(one).toEqual({ anchor: 0, head: 2 });
    const two = move(text, turns, one, 'word-right', true);
    expect(ordered(two)).toEqual({ start: 0, end: 6 });
    expect(text.slice(0, 6)).toBe('We met');
  });

  it('moves and extends by turn', () => {
    expect(move(text, turns, { anchor: 3, head: 3 }, 'turn-down', false)).toEqual({ anchor: 20, head: 20 });
    expect(move(text, turns, { anchor: 20, head: 20 }, 'turn-end', true)).toEqual({ anchor: 20, head: 39 });
    expect(move(text, turns, { anchor: 25, head: 25 }, 'turn-up', false)).toEqual({ anchor: 20, head: 20 });
    expect(move(text, turns, { anchor: 20, head: 20 }, 'turn-up', false)).toEqual({ anchor: 0, head: 0 });
  });
});

describe('whole turns and sentences', () => {
  const three = 'Hi.\nI came in ninety-one. Dr. Pell ran it then! Did you know him?\nNo.';
  const t3 = [{ start: 0, end: 3 }, { start: 4, end: 65 }, { start: 66, end: 69 }];

  it('extends by whole turns with Shift+Down: first the rest of this turn, then the next', () => {
    const a = move(three, t3, { anchor: 6, head: 10 }, 'turn-down', true);
    expect(a).toEqual({ anchor: 6, head: 65 });
    expect(move(three, t3, a, 'turn-down', true)).toEqual({ anchor: 6, head: 69 });
  });

  it('selects the whole turn', () => {
    expect(turnSelection(t3, 30)).toEqual({ anchor: 4, head: 65 });
  });

  it('selects the sentence around the cursor (UAX #29 sentence boundaries, via Intl.Segmenter)', () => {
    const s1 = sentenceSelection(three, t3, 8)!;
    expect(three.slice(s1.anchor, s1.head)).toBe('I came in ninety-one.');
    const s3 = sentenceSelection(three, t3, 60)!;
    expect(three.slice(s3.anchor, s3.head)).toBe('Did you know him?');
  });
});
