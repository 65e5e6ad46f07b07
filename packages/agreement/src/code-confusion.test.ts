import { describe, expect, it } from 'vitest';
import type { CodedText } from './coded-text.js';
import { codeConfusion, NO_CODE } from './code-confusion.js';

// Invented text: four turns of 10 characters, two coders.
const text: CodedText = {
  textId: 'walk',
  textLength: 40,
  units: [0, 10, 20, 30].map((s) => ({ start: s, end: s + 10 })),
  segments: [
    { coderId: 'ana', codeId: 'hope', start: 0, end: 10 },
    { coderId: 'ben', codeId: 'hope', start: 0, end: 10 }, // turn 1: both hope
    { coderId: 'ana', codeId: 'loss', start: 10, end: 20 },
    { coderId: 'ben', codeId: 'work', start: 10, end: 15 }, // turn 2: loss vs work
    { coderId: 'ana', codeId: 'work', start: 20, end: 30 }, // turn 3: work vs nothing
    // turn 4: nothing from either
  ],
};

describe('codeConfusion (common practice, see the function comment)', () => {
  it('fixed units: agreement on the diagonal, disagreements crossed, uncoded as (none)', () => {
    const r = codeConfusion([text], 'ana', 'ben', { codes: ['hope', 'loss', 'work'] });
    expect(r.labels).toEqual(['hope', 'loss', 'work', NO_CODE]);
    expect(r.table).toEqual([
      [1, 0, 0, 0],
      [0, 0, 1, 0],
      [0, 0, 0, 1],
      [0, 0, 0, 1],
    ]);
  });
  it('character level weighs by characters; cells sum to the text length when one code at a time', () => {
    const r = codeConfusion([text], 'ana', 'ben', { codes: ['hope', 'loss', 'work'], unit: 'character' });
    expect(r.table).toEqual([
      [10, 0, 0, 0],
      [0, 0, 5, 5],
      [0, 0, 0, 10],
      [0, 0, 0, 10],
    ]);
    expect(r.table.flat().reduce((s, x) => s + x, 0)).toBe(40);
  });
  it('refuses the same coder twice', () => {
    expect(() => codeConfusion([text], 'ana', 'ana')).toThrow(expect.objectContaining({ code: 'invalid-input' }));
  });
});
