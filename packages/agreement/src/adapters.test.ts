import { describe, expect, it } from 'vitest';
import { characterData, fixedUnitData, partitionSpans, unitizingSpans } from './adapters.js';
import type { CodedText } from './coded-text.js';

// An invented interview excerpt: three speaker turns on a 30-character text, two coders.
const text: CodedText = {
  textId: 't1',
  textLength: 30,
  units: [{ start: 0, end: 10 }, { start: 10, end: 20 }, { start: 20, end: 30 }],
  coders: ['ana', 'ben'],
  segments: [
    { coderId: 'ana', codeId: 'hope', start: 2, end: 8 },
    { coderId: 'ana', codeId: 'hope', start: 6, end: 12 }, // overlaps her own first segment
    { coderId: 'ben', codeId: 'hope', start: 19, end: 21 }, // touches two turns by one character each
    { coderId: 'ben', codeId: 'loss', start: 0, end: 5 },
  ],
};

describe('adapters (common practice: presence = any shared character; half-open offsets)', () => {
  it('fixedUnitData marks a unit when a segment shares at least one character with it', () => {
    expect(fixedUnitData(text, 'hope')).toEqual([
      [1, 1, 0],
      [0, 1, 1],
    ]);
    expect(fixedUnitData(text, 'loss')).toEqual([
      [0, 0, 0],
      [1, 0, 0],
    ]);
  });
  it('characterData: one column per character, end exclusive', () => {
    const [ana, ben] = characterData(text, 'hope');
    expect(ana!.join('')).toBe('001111111111000000000000000000');
    expect(ben!.join('')).toBe('000000000000000000011000000000');
  });
  it('unitizingSpans merges a coder\'s overlapping segments of one code', () => {
    expect(unitizingSpans(text, ['hope'])).toEqual([
      { coder: 'ana', value: 'hope', start: 2, end: 12 },
      { coder: 'ben', value: 'hope', start: 19, end: 21 },
    ]);
    expect(partitionSpans(text, ['loss'])).toEqual([{ coder: 'ben', value: 'loss', start: 0, end: 5 }]);
  });
  it('refuses segments outside the text or with bad offsets', () => {
    const bad = (segments: CodedText['segments'], code: string) =>
      expect(() => fixedUnitData({ ...text, segments }, 'hope')).toThrow(expect.objectContaining({ code }));
    bad([{ coderId: 'ana', codeId: 'hope', start: 25, end: 31 }], 'span-outside-continuum');
    bad([{ coderId: 'ana', codeId: 'hope', start: 5, end: 5 }], 'invalid-value');
    bad([{ coderId: 'ana', codeId: 'hope', start: 0.5, end: 3 }], 'invalid-value');
    expect(() => fixedUnitData({ ...text, units: undefined }, 'hope')).toThrow(expect.objectContaining({ code: 'invalid-input' }));
  });
});
