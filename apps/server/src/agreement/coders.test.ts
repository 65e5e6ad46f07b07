import { describe, expect, it } from 'vitest';
import { countedOn, decideCoders, type TextLayers } from './coders.js';

// Text A: ana and ben coded, lee only opened it. Text B: ana coded, ben only opened it, lee never opened it.
const TEXTS: TextLayers[] = [
  { textId: 'A', layers: [{ coderId: 'ana', segments: 3 }, { coderId: 'lee', segments: 0 }, { coderId: 'ben', segments: 1 }] },
  { textId: 'B', layers: [{ coderId: 'ana', segments: 2 }, { coderId: 'ben', segments: 0 }] },
];

describe('decideCoders', () => {
  it('by default counts whoever applied a code on the text; an opened, empty layer is left out as "no codes applied"', () => {
    const d = decideCoders(TEXTS);
    expect(d.rule).toBe('applied-codes');
    expect(d.description).toMatch(/applied at least one code/);
    expect(d.perText).toEqual([
      { textId: 'A', counted: ['ana', 'ben'], leftOut: [{ coderId: 'lee', reason: 'no-codes', message: 'not counted: no codes applied' }] },
      { textId: 'B', counted: ['ana'], leftOut: [{ coderId: 'ben', reason: 'no-codes', message: 'not counted: no codes applied' }] },
    ]);
    expect(d.coders).toEqual(['ana', 'ben']); // lee counted nowhere
  });

  it('an explicit list wins: a listed person with an empty layer is counted, one without a layer is missing there, others are left out', () => {
    const d = decideCoders(TEXTS, { coders: ['ben', 'ana'], participants: ['ana', 'lee'] });
    expect(d.rule).toBe('listed');
    expect(d.coders).toEqual(['ben', 'ana']);
    expect(d.perText[0]).toEqual({ textId: 'A', counted: ['ben', 'ana'], leftOut: [{ coderId: 'lee', reason: 'not-listed', message: 'not counted: not in the coders= list' }] });
    expect(countedOn(d, 'B')).toEqual(['ben', 'ana']);

    const lee = decideCoders(TEXTS, { coders: ['ana', 'lee'] });
    expect(lee.perText[1]!.leftOut).toEqual([
      { coderId: 'ben', reason: 'not-listed', message: 'not counted: not in the coders= list' },
      { coderId: 'lee', reason: 'no-layer', message: 'not counted: has no layer on this text' },
    ]);
    expect(lee.coders).toEqual(['ana', 'lee']);
  });

  it("a round's participants are counted where they have a layer, with or without codes; nobody else is", () => {
    const d = decideCoders(TEXTS, { participants: ['ben', 'ana', 'zoe'] });
    expect(d.rule).toBe('participants');
    expect(d.perText[0]!.counted).toEqual(['ben', 'ana']);
    expect(d.perText[0]!.leftOut.map((l) => [l.coderId, l.reason])).toEqual([
      ['lee', 'not-participant'],
      ['zoe', 'no-layer'],
    ]);
    expect(d.perText[1]!.counted).toEqual(['ben', 'ana']); // ben's empty layer counts in a round
    expect(d.coders).toEqual(['ben', 'ana']); // zoe has no layer anywhere
  });

  it('no texts, no coders; a duplicate layer row changes nothing', () => {
    expect(decideCoders([]).coders).toEqual([]);
    const d = decideCoders([{ textId: 'A', layers: [{ coderId: 'ana', segments: 0 }, { coderId: 'ana', segments: 0 }] }]);
    expect(d.perText[0]!.leftOut).toHaveLength(1);
    expect(countedOn(d, 'nowhere')).toEqual([]);
  });
});
