// The list of codes in view and the overflow warning's words (the project's own rule, issue 15 item 1:
// warn when a codebook has more codes than colour-and-line pairs that can be told apart; the pairs
// themselves are tested in packages/model palette.test.ts).
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { addCode, assignMarks, DISTINCT_MARKS, proposeCode } from '@gloss/model';
import { codesInView, marksOverflowWords } from './code-marks.js';

describe('codes in view', () => {
  it('lists the codebook codes, then pending proposals, so both screens give a code the same mark', () => {
    const cb = new Y.Doc();
    addCode(cb, { label: 'first' }, { by: 'lead' });
    proposeCode(cb, { label: 'proposed', author: 'coder' });
    addCode(cb, { label: 'second' }, { by: 'lead' });
    const codes = codesInView(cb);
    expect(codes.map((c) => c.label.replace(/ \(proposed\)$/, ''))).toEqual(['first', 'second', 'proposed']);
    const a = assignMarks(codes).marks;
    const b = assignMarks(codesInView(cb)).marks;
    expect([...b]).toEqual([...a]);
    expect(new Set([...a.values()].map((m) => `${m.hex}${m.mark}`)).size).toBe(3);
  });
  it('says how many codes there are and how many pairs these codes can be told apart by', () => {
    const plain = Array.from({ length: DISTINCT_MARKS + 5 }, (_, i) => ({ id: `c${i}` }));
    const a = assignMarks(plain);
    expect(a.overflow).toBe(true);
    expect(marksOverflowWords(plain.length, a.pairs)).toBe(`This codebook has ${DISTINCT_MARKS + 5} codes, more than the ${DISTINCT_MARKS} colour-and-line pairs that can be told apart: some codes share one, so read the code names rather than the colours.`);
    // A stored colour outside the palette (black, which addCode may store) gives a pair to the code that
    // stores it, and to no other: one black code and 28 others are told apart, one more overflows, and
    // the warning quotes 29.
    const withBlack = [{ id: 'black', colour: '#000000' }, ...Array.from({ length: DISTINCT_MARKS + 1 }, (_, i) => ({ id: `d${i}` }))];
    const b = assignMarks(withBlack);
    expect(b.overflow).toBe(true);
    expect(b.pairs).toBe(DISTINCT_MARKS + 1);
    const fits = assignMarks(withBlack.slice(0, DISTINCT_MARKS + 1));
    expect(fits.overflow).toBe(false);
    expect(fits.pairs).toBe(DISTINCT_MARKS + 1);
  });
});
