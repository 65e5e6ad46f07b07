import { describe, expect, it } from 'vitest';
import { addMemo, addReply, createMemosDoc, getMemo, getMemoBody, listMemos, listReplies, MEMOS_ROOT, promoteJotting, removeMemo, searchMemos, updateMemo } from './memos-doc.js';
import { InvalidArgumentError, NotFoundError } from './errors.js';

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

describe('replies', () => {
  it('threads replies under their memo or jotting, as entries of the replier, with the memo’s attachment', () => {
    const doc = createMemosDoc();
    const at = { kind: 'segment', textId: 't1', segmentId: 's9' } as const;
    const jot = addMemo(doc, { kind: 'jotting', author: 'ben', body: 'ask about the ferry timetable', attachedTo: at }, clock);
    const r1 = addReply(doc, jot, { author: 'ana', body: 'P04 says the timetable changed in spring.' }, clock);
    const r2 = addReply(doc, jot, { author: 'ben', body: 'Then ask P07 too.' }, clock);
    expect(listReplies(doc, jot).map((r) => [r.id, r.author, r.replyTo])).toEqual([[r1, 'ana', jot], [r2, 'ben', jot]]);
    expect(getMemo(doc, r1).attachedTo).toEqual(at);
    // replies are not memos of their own in lists, filters and search
    expect(listMemos(doc).map((m) => m.id)).toEqual([jot]);
    expect(listMemos(doc, { segmentId: 's9' })).toHaveLength(1);
    expect(listMemos(doc, { replies: true })).toHaveLength(3);
    expect(searchMemos(doc, 'spring')).toEqual([]);
    // each reply is its own entry: the replier edits it like any memo of theirs
    updateMemo(doc, r1, { body: 'P04: changed in spring 1998.' }, clock);
    expect(listReplies(doc, jot)[0]!.body).toBe('P04: changed in spring 1998.');
  });

  it('refuses a reply to a reply, an empty reply and a reply to nothing; a reply outlives its deleted memo', () => {
    const doc = createMemosDoc();
    const memo = addMemo(doc, { author: 'ana', title: 'Hunch', attachedTo: { kind: 'study' } }, clock);
    const r = addReply(doc, memo, { author: 'ben', body: 'Agreed.' }, clock);
    expect(() => addReply(doc, r, { author: 'ana', body: 'nested' })).toThrow(InvalidArgumentError);
    expect(() => addReply(doc, memo, { author: 'ana', body: '   ' })).toThrow(InvalidArgumentError);
    expect(() => addReply(doc, 'm-none', { author: 'ana', body: 'x' })).toThrow(NotFoundError);
    removeMemo(doc, memo);
    // nothing of ben's is lost: his reply is listed on its own, still saying what it answered
    expect(listMemos(doc)).toMatchObject([{ id: r, replyTo: memo, body: 'Agreed.' }]);
  });
});
