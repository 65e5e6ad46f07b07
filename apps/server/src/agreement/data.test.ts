import { describe, expect, it } from 'vitest';
import { buildMatrix, select, type TextInput } from './data.js';
import { differences } from './differences.js';

// Two invented texts; expected presence/absence worked out by hand (any shared character counts).
const a: TextInput = {
  textId: 'a',
  text: 'aaaa bbbb cccc',
  textLength: 14,
  units: [
    { start: 0, end: 5 },
    { start: 5, end: 10 },
    { start: 10, end: 14 },
  ],
  coders: ['x', 'y'],
  segments: [
    { coderId: 'x', codeId: 'k', start: 4, end: 6 }, // touches units 0 and 1
    { coderId: 'y', codeId: 'k', start: 5, end: 9 },
    { coderId: 'y', codeId: 'm', start: 11, end: 12 },
  ],
};
const b: TextInput = { textId: 'b', text: 'dd', textLength: 2, units: [{ start: 0, end: 2 }], coders: ['x'], segments: [] };

describe('presence/absence matrix', () => {
  it('stacks (text, code, unit) columns; a coder without a layer is missing on that text', () => {
    const m = buildMatrix([a, b], ['k', 'm'], ['x', 'y'], 'fixed');
    expect(m.columns.map((c) => `${c.textId}.${c.codeId}.${c.unit}`)).toEqual(['a.k.0', 'a.k.1', 'a.k.2', 'a.m.0', 'a.m.1', 'a.m.2', 'b.k.0', 'b.m.0']);
    expect(m.rows).toEqual([
      [1, 1, 0, 0, 0, 0, 0, 0],
      [0, 1, 0, 0, 0, 1, null, null],
    ]);
    expect(select(m, (c) => c.codeId === 'm', ['y']).rows).toEqual([[0, 0, 1, null]]);
  });

  it('character level gives one column per character and code', () => {
    const m = buildMatrix([a], ['k'], ['x', 'y'], 'character');
    expect(m.rows[0]!.join('')).toBe('00001100000000');
    expect(m.rows[1]!.join('')).toBe('00000111100000');
  });

  it('differences list only the units coded differently, each coder with their codes', () => {
    const d = differences([a, b], ['k', 'm'], ['x', 'y']);
    expect(d.map((x) => x.quote)).toEqual(['aaaa ', 'cccc']);
    expect(d[1]!.byCoder).toEqual([
      { coderId: 'x', codeIds: [] },
      { coderId: 'y', codeIds: ['m'] },
    ]);
  });
});
