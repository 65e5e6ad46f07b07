import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { correctText, createTextDoc, getText, readText, TEXT_ROOT, TURNS_ROOT } from './text-doc.js';
import { readTurns, turnIndexAt } from './turns.js';
import { InvalidRangeError } from './errors.js';

// Invented interview (demo rule: made-up people and places).
const transcript = {
  turns: [
    { speaker: 'I', startMs: 0, endMs: 4000, text: 'How did you come to Harwick?' },
    { speaker: 'P07', startMs: 4000, endMs: 9000, text: 'My aunt ran the bakery there.' },
    { speaker: 'I', startMs: 9000, endMs: null, text: 'And you stayed?' },
  ],
};

describe('text document', () => {
  it('joins turns with a newline and keeps the DESIGN §2 root names', () => {
    const doc = createTextDoc(transcript);
    expect(doc.gc).toBe(false);
    expect(doc.getText(TEXT_ROOT).toString()).toBe('How did you come to Harwick?\nMy aunt ran the bakery there.\nAnd you stayed?');
    expect(doc.getArray(TURNS_ROOT).length).toBe(3);
    const turns = readTurns(doc);
    expect(turns.map((t) => [t.speaker, t.start, t.end])).toEqual([
      ['I', 0, 29],
      ['P07', 29, 59],
      ['I', 59, 74],
    ]);
    expect(turnIndexAt(turns, 30)).toBe(1);
  });

  it('turn offsets follow corrections, and survive sync to another replica', () => {
    const doc = createTextDoc(transcript);
    correctText(doc, 20, 7, 'Harwick Bay'); // a correction inside turn 1
    const other = new Y.Doc({ gc: false });
    Y.applyUpdate(other, Y.encodeStateAsUpdate(doc));
    const turns = readTurns(other);
    expect(readText(other).slice(turns[1]!.start, turns[1]!.end)).toBe('My aunt ran the bakery there.\n');
    expect(turns[1]!.start).toBe(33);
  });

  it('a turn start sticks to its first character: text typed just before it joins the previous turn', () => {
    const doc = createTextDoc(transcript);
    getText(doc).insert(readTurns(doc)[1]!.start, '[pause] ');
    const turns = readTurns(doc);
    expect(readText(doc).slice(turns[0]!.start, turns[0]!.end)).toBe('How did you come to Harwick?\n[pause] ');
    expect(readText(doc).slice(turns[1]!.start, turns[1]!.end)).toBe('My aunt ran the bakery there.\n');
  });

  it('refuses a malformed transcript with a typed error', () => {
    expect(() => createTextDoc({ turns: [{ speaker: 'I', startMs: 0, endMs: null, text: 5 as never }] })).toThrow(expect.objectContaining({ code: 'invalid-argument' }));
    expect(() => createTextDoc({} as never)).toThrow(expect.objectContaining({ code: 'invalid-argument' }));
    expect(readText(createTextDoc({ turns: [] }))).toBe('');
  });

  it('rejects corrections outside the text with a typed error and changes nothing', () => {
    const doc = createTextDoc(transcript);
    const before = readText(doc);
    expect(() => correctText(doc, 70, 10, 'x')).toThrow(InvalidRangeError);
    expect(() => correctText(doc, -1, 0, 'x')).toThrow(expect.objectContaining({ code: 'invalid-range' }));
    expect(readText(doc)).toBe(before);
  });
});
