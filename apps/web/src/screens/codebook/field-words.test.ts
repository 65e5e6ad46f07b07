// The codebook names its fields in words, not by their keys in the document (common practice: no internal names on screen).
import { describe, expect, it } from 'vitest';
import { fieldWords } from './field-words.js';

describe('fieldWords', () => {
  it('names the four definition fields as the entry editor labels them, and passes others through', () => {
    expect(['briefDefinition', 'fullDefinition', 'inclusion', 'exclusion'].map(fieldWords)).toEqual(['brief definition', 'full definition', 'when to use', 'when not to use']);
    expect(fieldWords('colour')).toBe('colour');
  });
});
