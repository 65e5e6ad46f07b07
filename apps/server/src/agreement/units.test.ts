import { createTextDoc, readTurns } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import { fixedUnits } from './units.js';

// Invented transcript. Expected units worked out by hand (common practice: a paragraph is a run of
// text between line breaks; a sentence ends at . ! ? or … before a space or the end).
const doc = createTextDoc({
  turns: [
    { speaker: 'I', startMs: null, endMs: null, text: 'Where did you meet? Tell me.' },
    { speaker: 'P02', startMs: null, endMs: null, text: 'At the pier… it was "late." Then home!' },
  ],
});
const text = doc.getText('text').toString();
const slice = (u: { start: number; end: number }) => text.slice(u.start, u.end);

describe('fixed units', () => {
  it('speaker turns run to the next turn, the line break included', () => {
    expect(fixedUnits('turn', text, readTurns(doc)).map(slice)).toEqual(['Where did you meet? Tell me.\n', 'At the pier… it was "late." Then home!']);
  });

  it('paragraphs are the lines, without the line break', () => {
    expect(fixedUnits('paragraph', text, []).map(slice)).toEqual(['Where did you meet? Tell me.', 'At the pier… it was "late." Then home!']);
  });

  it('sentences end at terminal punctuation (closing quotes kept) before a space or the end', () => {
    expect(fixedUnits('sentence', text, []).map(slice)).toEqual(['Where did you meet?', ' Tell me.', 'At the pier…', ' it was "late."', ' Then home!']);
  });

  it('characters are one unit each; blank lines make no paragraph', () => {
    expect(fixedUnits('character', 'ab', [])).toEqual([
      { start: 0, end: 1 },
      { start: 1, end: 2 },
    ]);
    expect(fixedUnits('paragraph', 'one\n\n  \ntwo', []).length).toBe(2);
  });
});
