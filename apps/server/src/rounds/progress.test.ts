import { describe, expect, it } from 'vitest';
import { wordsCovered } from './progress.js';

// Counting by hand (common practice: a word is a run of non-space characters).
describe('words covered by segments', () => {
  const text = 'My neighbour lent me a spade.';
  it('counts each word touched once, however many segments touch it', () => {
    expect(wordsCovered(text, [])).toBe(0);
    expect(wordsCovered(text, [{ start: 3, end: 12 }])).toBe(1); // "neighbour"
    expect(wordsCovered(text, [{ start: 3, end: 14 }, { start: 4, end: 6 }])).toBe(2); // "neighbour", "lent"
    expect(wordsCovered(text, [{ start: 0, end: text.length }])).toBe(6);
    expect(wordsCovered(text, [{ start: 12, end: 13 }])).toBe(0); // only the space
    expect(wordsCovered(text, [{ start: 5, end: 5 }])).toBe(0); // collapsed
  });
});
