/**
 * Replacing identifiers in a study's other documents and rebuilding them without their history.
 * Invented codebook, memos and a layer with identifiers placed by hand; what must hold is that the
 * original bytes are nowhere in the encoded documents afterwards (common practice: search the
 * serialised form, as the server's scan does on the database).
 */
import * as Y from 'yjs';
import { describe, expect, it } from 'vitest';
import { addCode, addExample, createCodebookDoc, getCode, getDefinitionText, recordDefinitionEdit } from './codebook-doc.js';
import { captureAnchors, docClients, docStrings, moveDocAnchors, rebuildDoc, replaceInDoc, replaceInPlain, replaceInString, restoreAnchors, updateClients } from './deid-docs.js';
import { applyEdits, planEdits, rebuildTextDoc } from './deid.js';
import { exampleFromSegment, resolveExample } from './examples.js';
import { addSegment, getSegment, newLayerDoc, setSegmentNote } from './layer-doc.js';
import { passageAttachment, resolvePassage } from './memo-passage.js';
import { addMemo, addReply, createMemosDoc, getMemo, listReplies, updateMemo } from './memos-doc.js';
import { createTextDoc, getText } from './text-doc.js';

const REPLACEMENTS = [
  { original: 'Dana Whitcombe', pseudonym: '[Person 1]' },
  { original: 'Dana', pseudonym: '[Person 1]' },
  { original: 'Lowmere', pseudonym: '[Town A]' },
];
const holds = (doc: Y.Doc, words: string) => Buffer.from(Y.encodeStateAsUpdate(doc)).includes(Buffer.from(words));
const actor = { by: 'u1' };

function studyDocs() {
  const text = createTextDoc({ turns: [{ speaker: 'P3', startMs: null, endMs: null, text: 'Dana Whitcombe drove me to Lowmere every week.' }] });
  const layer = newLayerDoc();
  const seg = addSegment(layer, text, { codeId: 'c1', start: 15, end: 23 }); // "drove me"
  setSegmentNote(layer, seg, 'Dana again, the neighbour');
  const cb = createCodebookDoc();
  const code = addCode(cb, { label: 'Help from neighbours', briefDefinition: 'Like Dana Whitcombe in Lowmere', inclusion: 'Named helpers (e.g. Dana)' }, actor);
  recordDefinitionEdit(cb, actor, code, 'briefDefinition', 'Like Dana', 'Like Dana Whitcombe in Lowmere');
  addExample(cb, code, exampleFromSegment(text, layer, 't1', seg), 'example', actor);
  addExample(cb, code, { textId: 't1', quote: 'drove me to Lowmere' }, 'near-miss', actor);
  const memos = createMemosDoc();
  const memo = addMemo(memos, { author: 'u1', title: 'About Dana', body: 'Dana Whitcombe comes up in every Lowmere interview.', attachedTo: { kind: 'study' } });
  addReply(memos, memo, { author: 'u2', body: 'Ask Dana about Lowmere?' });
  const jotting = addMemo(memos, { kind: 'jotting', author: 'u1', body: 'here', attachedTo: passageAttachment(text, 't1', 27, 34) });
  return { text, layer, seg, cb, code, memos, memo, jotting };
}

describe('replaceInDoc', () => {
  it('replaces whole words in definitions, examples, the change log, memos, replies and notes, and nothing else', () => {
    const d = studyDocs();
    expect(replaceInString('Dana, Danaher and Dana Whitcombe', REPLACEMENTS)).toEqual({ text: '[Person 1], Danaher and [Person 1]', count: 2 });
    const before = docStrings(d.cb).map((s) => s.path);
    expect(before).toEqual(expect.arrayContaining(['codes.' + d.code + '.briefDefinition', 'changes.1.before', 'changes.1.after']));
    expect(replaceInDoc(d.cb, REPLACEMENTS)).toBeGreaterThanOrEqual(7);
    expect(replaceInDoc(d.memos, REPLACEMENTS)).toBe(5); // title 1, body 2, reply 2
    expect(replaceInDoc(d.layer, REPLACEMENTS)).toBe(1);
    const code = getCode(d.cb, d.code);
    expect(code.briefDefinition).toBe('Like [Person 1] in [Town A]');
    expect(code.inclusion).toBe('Named helpers (e.g. [Person 1])');
    expect(code.examples[0]!.quote).toBe('drove me');
    expect(code.nearMisses[0]!.quote).toBe('drove me to [Town A]');
    expect(getMemo(d.memos, d.memo)).toMatchObject({ title: 'About [Person 1]', body: '[Person 1] comes up in every [Town A] interview.' });
    expect(listReplies(d.memos, d.memo)[0]!.body).toBe('Ask [Person 1] about [Town A]?');
    expect(getSegment(d.layer, d.seg).note).toBe('[Person 1] again, the neighbour');
    for (const doc of [d.cb, d.memos, d.layer]) {
      expect(docStrings(doc).some((s) => /Dana|Lowmere/.test(s.text))).toBe(false);
      // replaced is not removed: the deleted words are still in the history (gc off) until a rebuild
      expect(holds(doc, 'Dana')).toBe(true);
    }
    // anchors are untouched: the example still resolves on the text
    expect(resolveExample(d.text, code.examples[0]!).current).toBe('drove me');
    expect(getDefinitionText(d.cb, d.code, 'briefDefinition').toString()).toBe('Like [Person 1] in [Town A]');
  });
});

describe('rebuildDoc', () => {
  it('keeps the current state, drops the deleted words and every old client id, and moves anchors to a rebuilt text', () => {
    const d = studyDocs();
    // the text first, as the purge does (model deid.ts), then the documents that point into it
    getText(d.text).delete(0, 14);
    getText(d.text).insert(0, '[Person 1]');
    const freshText = rebuildTextDoc(d.text);
    for (const doc of [d.cb, d.memos, d.layer]) replaceInDoc(doc, REPLACEMENTS);
    const moves = new Map([['t1', { old: d.text, fresh: freshText }]]);
    expect(moveDocAnchors(d.cb, moves)).toBe(1); // the example (the near-miss has no anchors)
    expect(moveDocAnchors(d.memos, moves)).toBe(1); // the jotting's passage
    const cb = rebuildDoc(d.cb);
    const memos = rebuildDoc(d.memos);
    for (const [old, fresh] of [[d.cb, cb], [d.memos, memos]] as const) {
      expect(holds(fresh, 'Dana')).toBe(false);
      expect(holds(fresh, 'Lowmere')).toBe(false);
      expect(fresh.share.size).toBe(old.share.size);
      const oldClients = new Set(docClients(old));
      expect(docClients(fresh).some((c) => oldClients.has(c))).toBe(false);
      expect([...updateClients(Y.encodeStateAsUpdate(old))].every((c) => oldClients.has(c))).toBe(true);
    }
    const code = getCode(cb, d.code);
    expect(code).toMatchObject({ label: 'Help from neighbours', briefDefinition: 'Like [Person 1] in [Town A]' });
    expect(resolveExample(freshText, code.examples[0]!)).toMatchObject({ current: 'drove me', start: 11, end: 19, changed: false });
    expect(getMemo(memos, d.memo).body).toBe('[Person 1] comes up in every [Town A] interview.');
    expect(listReplies(memos, d.memo)).toHaveLength(1);
    const passage = resolvePassage(freshText, 't1', getMemo(memos, d.jotting).attachedTo);
    expect(passage).toEqual({ start: 23, end: 30 }); // "Lowmere", four characters earlier than before
    expect(getText(freshText).toString().slice(23, 30)).toBe('Lowmere');
    // the rebuilt documents stay editable as the originals were
    updateMemo(memos, d.memo, { body: 'edited' });
    expect(getMemo(memos, d.memo).body).toBe('edited');
  });
});

describe('captureAnchors / restoreAnchors', () => {
  it('an example and a jotting on a replaced name are on its pseudonym afterwards, as a segment would be', () => {
    const d = studyDocs();
    const cb = d.cb;
    // an example on exactly "Dana Whitcombe" (offsets 0–14), and a jotting on "Dana Whitcombe drove"
    addExample(cb, d.code, exampleFromSegment(d.text, d.layer, 't1', addSegment(d.layer, d.text, { codeId: 'c1', start: 0, end: 14 })), 'example', actor);
    const jot = addMemo(d.memos, { kind: 'jotting', author: 'u1', body: 'x', attachedTo: passageAttachment(d.text, 't1', 0, 20) });
    const edits = planEdits(getText(d.text).toString(), REPLACEMENTS);
    const captured = [cb, d.memos].map((doc) => captureAnchors(doc, 't1', d.text));
    applyEdits(d.text, [d.layer], edits);
    expect(restoreAnchors(cb, 't1', d.text, captured[0]!, edits)).toBe(1); // the name ("drove me" keeps its own anchors)
    restoreAnchors(d.memos, 't1', d.text, captured[1]!, edits);
    const ex = getCode(cb, d.code).examples;
    expect(ex.map((e) => resolveExample(d.text, e).current)).toEqual(['drove me', '[Person 1]']);
    const p = resolvePassage(d.text, 't1', getMemo(d.memos, jot).attachedTo)!;
    expect(getText(d.text).toString().slice(p.start, p.end)).toBe('[Person 1] drove');
  });
});

describe('replaceInPlain (audit details)', () => {
  const replacements = [{ original: 'Lowmere', pseudonym: '[Town A]' }];
  it('replaces whole words in nested strings, counts them, and leaves ids alone', () => {
    const detail = { name: 'Lowmere pilot', id: 'Lowmere', parts: ['in Lowmere', { note: 'Lowmere, Lowmere' }], number: 1 };
    const r = replaceInPlain(detail, replacements);
    expect(r.count).toBe(4);
    expect(r.value).toEqual({ name: '[Town A] pilot', id: 'Lowmere', parts: ['in [Town A]', { note: '[Town A], [Town A]' }], number: 1 });
    expect(detail.name).toBe('Lowmere pilot'); // the input is not changed in place
  });
  it('gives back the same object when nothing matched', () => {
    const detail = { name: 'Lowmereside' };
    expect(replaceInPlain(detail, replacements)).toEqual({ value: detail, count: 0 });
    expect(replaceInPlain(null, replacements)).toEqual({ value: null, count: 0 });
  });
});

describe('id-shaped strings are never words', () => {
  // Common practice: v4 UUIDs (RFC 9562 §5.4) often hold two all-digit groups, which look like a phone number.
  const id = '9c98d66d-b7c0-4453-9646-8a91392fe008';
  it('docStrings leaves them out, under any key', () => {
    const cb = createCodebookDoc();
    cb.getMap('extra').set('someone', { who: id, note: 'call 4453-9646' });
    const texts = docStrings(cb).map((s) => s.text);
    expect(texts).toContain('call 4453-9646');
    expect(texts).not.toContain(id);
  });
  it('replacement does not reach into them', () => {
    const cb = createCodebookDoc();
    cb.getMap('extra').set('someone', { who: id, note: 'call 4453-9646' });
    expect(replaceInDoc(cb, [{ original: '4453-9646', pseudonym: '[phone]' }])).toBe(1);
    expect(cb.getMap('extra').get('someone')).toEqual({ who: id, note: 'call [phone]' });
    expect(replaceInPlain({ decider: id }, [{ original: '4453-9646', pseudonym: '[phone]' }]).count).toBe(0);
  });
});
