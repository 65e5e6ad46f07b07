import { describe, expect, it } from 'vitest';
import { addMemo, createMemosDoc, getMemo } from './memos-doc.js';
import { passageAttachment, resolvePassage } from './memo-passage.js';
import { getText } from './text-doc.js';
import * as Y from 'yjs';
import { InvalidArgumentError, InvalidRangeError } from './errors.js';

const textDoc = (words: string) => {
  const d = new Y.Doc({ gc: false });
  getText(d).insert(0, words);
  return d;
};
const WORDS = 'We borrowed a projector from the school.';

describe('a jotting on a passage (anchored like a segment: common practice for anchored annotations)', () => {
  it('stays on its words while text is typed before, at the edges of and inside them', () => {
    const t = textDoc(WORDS);
    const at = WORDS.indexOf('a projector');
    const a = passageAttachment(t, 't1', at, at + 'a projector'.length);
    const memos = createMemosDoc();
    const id = addMemo(memos, { kind: 'jotting', author: 'ana', body: 'whose projector?', attachedTo: a });
    const stored = getMemo(memos, id).attachedTo;
    const words = () => {
      const r = resolvePassage(t, 't1', stored)!;
      return getText(t).toString().slice(r.start, r.end);
    };
    expect(words()).toBe('a projector');
    getText(t).insert(0, 'In March ');
    expect(words()).toBe('a projector');
    // typed at either boundary stays outside, as for a segment (DESIGN §2)
    const s = getText(t).toString().indexOf('a projector');
    getText(t).insert(s + 'a projector'.length, ' again');
    getText(t).insert(s, 'then ');
    expect(words()).toBe('a projector');
    getText(t).insert(getText(t).toString().indexOf('projector'), 'old ');
    expect(words()).toBe('a old projector');
  });

  it('resolves nowhere for another text, a whole-text attachment, deleted words or malformed anchors', () => {
    const t = textDoc(WORDS);
    const a = passageAttachment(t, 't1', 3, 11);
    expect(resolvePassage(t, 't2', a)).toBeNull();
    expect(resolvePassage(t, 't1', { kind: 'text', textId: 't1' })).toBeNull();
    expect(resolvePassage(t, 't1', { kind: 'text', textId: 't1', start: '%%%', end: '%%%' })).toBeNull();
    getText(t).delete(2, 12);
    expect(resolvePassage(t, 't1', a)).toBeNull();
  });

  it('refuses an empty passage, and a memo whose passage has only one end', () => {
    const t = textDoc(WORDS);
    expect(() => passageAttachment(t, 't1', 4, 4)).toThrow(InvalidRangeError);
    const a = passageAttachment(t, 't1', 3, 11) as { kind: 'text'; textId: string; start: string };
    expect(() => addMemo(createMemosDoc(), { author: 'ana', attachedTo: { kind: 'text', textId: 't1', start: a.start } })).toThrow(InvalidArgumentError);
  });
});
