import { describe, expect, it } from 'vitest';
import { addMemo, createMemosDoc, getMemo, getMemoBody, listMemos, MEMOS_ROOT, promoteJotting, removeMemo, searchMemos, updateMemo } from './memos-doc.js';
import { InvalidArgumentError } from './errors.js';

let t = 0;
const clock = () => ++t;

describe('memos document', () => {
  it('attaches memos and jottings to the study, a text, a segment or a code', () => {
    const doc = createMemosDoc();
    const a = addMemo(doc, { author: 'ana', title: 'Early hunch', body: 'Leaving seems tied to the ferry.', attachedTo: { kind: 'study' } }, clock);
    const b = addMemo(doc, { kind: 'jotting', author: 'ben', body: 'ask about the ferry timetable', attachedTo: { kind: 'segment', textId: 't1', segmentId: 's9' } }, clock);
    addMemo(doc, { author: 'ana', title: 'On the code', attachedTo: { kind: 'code', codeId: 'k2' } }, clock);
    expect(doc.getMap(MEMOS_ROOT).size).toBe(3);
    expect(listMemos(doc, { kind: 'jotting' }).map((m) => m.id)).toEqual([b]);
    expect(listMemos(doc, { segmentId: 's9' }).map((m) => m.author)).toEqual(['ben']);
    expect(listMemos(doc, { codeId: 'k2' })).toHaveLength(1);
    getMemoBody(doc, a).insert(0, 'Hunch: ');
    expect(getMemo(doc, a).body).toBe('Hunch: Leaving seems tied to the ferry.');
    promoteJotting(doc, b, 'Ferry timetable', clock);
    expect(getMemo(doc, b)).toMatchObject({ kind: 'memo', title: 'Ferry timetable' });
    expect(() => promoteJotting(doc, b)).toThrow(InvalidArgumentError);
  });

  it('searches titles and bodies: every word must occur, case-insensitive', () => {
    const doc = createMemosDoc();
    const a = addMemo(doc, { author: 'ana', title: 'Ferry', body: 'The ferry and the school.', attachedTo: { kind: 'study' } }, clock);
    addMemo(doc, { author: 'ben', title: 'School', body: 'Only the school here.', attachedTo: { kind: 'study' } }, clock);
    expect(searchMemos(doc, 'FERRY school').map((h) => h.memo.id)).toEqual([a]);
    expect(searchMemos(doc, 'school')).toHaveLength(2);
    expect(searchMemos(doc, '   ')).toEqual([]);
    updateMemo(doc, a, { body: 'Nothing left.' }, clock);
    expect(searchMemos(doc, 'school').map((h) => h.memo.author)).toEqual(['ben']);
    removeMemo(doc, a);
    expect(listMemos(doc)).toHaveLength(1);
  });

  it('refuses a memo without author or with a malformed attachment', () => {
    const doc = createMemosDoc();
    expect(() => addMemo(doc, { author: '', attachedTo: { kind: 'study' } })).toThrow(InvalidArgumentError);
    expect(() => addMemo(doc, { author: 'a', attachedTo: { kind: 'segment', textId: 't' } as never })).toThrow(InvalidArgumentError);
    expect(listMemos(doc)).toEqual([]);
  });
});
