// English count nouns: singular for exactly one, plural otherwise, zero included (common practice).
import { describe, expect, it } from 'vitest';
import { countOf } from './count-words.js';

describe('countOf', () => {
  it('says "1 segment" and "0 segments", and takes an irregular plural', () => {
    expect(countOf(1, 'segment')).toBe('1 segment');
    expect(countOf(0, 'segment')).toBe('0 segments');
    expect(countOf(2, 'reply', 'replies')).toBe('2 replies');
  });
});
