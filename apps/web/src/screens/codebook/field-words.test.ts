// The codebook names its fields in words, not by their keys in the document (common practice: no internal names on screen).
import { describe, expect, it } from 'vitest';
import { changeWords, fieldWords } from './field-words.js';

describe('fieldWords', () => {
  it('names the four definition fields as the entry editor labels them, and passes others through', () => {
    expect(['briefDefinition', 'fullDefinition', 'inclusion', 'exclusion'].map(fieldWords)).toEqual(['brief definition', 'full definition', 'when to use', 'when not to use']);
    expect(fieldWords('colour')).toBe('colour');
  });
  it('says what a change did without the document keys', () => {
    expect(changeWords({ kind: 'example', field: 'nearMisses', detail: 'It was fine' })).toBe('near-miss added');
    expect(changeWords({ kind: 'example', field: 'examples', detail: 'removed ex-1' })).toBe('example removed');
    expect(changeWords({ kind: 'edit', field: 'briefDefinition' })).toBe('brief definition edited');
    expect(changeWords({ kind: 'theme', detail: 'added to What it costs' })).toBe('added to What it costs (theme)');
    expect(changeWords({ kind: 'exclusive-set', detail: 'added to Stance' })).toBe('added to Stance (mutually exclusive set)');
  });
});
