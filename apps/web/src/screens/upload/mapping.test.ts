import { describe, expect, it } from 'vitest';
import { addCase, createCodebookDoc, listCases } from '@gloss/model';
import { applyMapping, guessChoice } from './mapping.js';

describe('speaker to case mapping (project brief, issue 12)', () => {
  it('guesses the case of the same name, nothing for an interviewer, else a new case', () => {
    const doc = createCodebookDoc();
    const p = addCase(doc, { name: 'P02' });
    const cases = listCases(doc);
    expect(guessChoice('p02', cases)).toBe(`case:${p}`);
    expect(guessChoice('Interviewer', cases)).toBe('none');
    expect(guessChoice('I', cases)).toBe('none');
    expect(guessChoice('Tobias Lund', cases)).toBe('new');
  });

  it('makes one new case per label across files and links each text with its speaker', () => {
    const doc = createCodebookDoc();
    const p = addCase(doc, { name: 'P02' });
    const created = new Map<string, string>();
    expect(applyMapping(doc, 't1', { 'Grete': 'new', 'INTERVIEWER': 'none', 'P02': `case:${p}` }, created)).toBe(2);
    expect(applyMapping(doc, 't2', { 'grete ': 'new' }, created)).toBe(1);
    const byName = Object.fromEntries(listCases(doc).map((c) => [c.name, c]));
    expect(Object.keys(byName).sort()).toEqual(['Grete', 'P02']);
    expect(byName.Grete!.textIds).toEqual(['t1', 't2']);
    expect(byName.Grete!.speakers).toEqual({ t1: 'Grete', t2: 'grete' });
    expect(byName.P02!.speakers).toEqual({ t1: 'P02' });
  });
});
