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
  it('says how many codes there are and how many pairs can be told apart', () => {
    expect(marksOverflowWords(DISTINCT_MARKS + 5)).toBe(`This codebook has ${DISTINCT_MARKS + 5} codes, more than the ${DISTINCT_MARKS} colour-and-line pairs that can be told apart: some codes share one, so read the code names rather than the colours.`);
  });
});
