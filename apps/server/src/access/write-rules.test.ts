import { acceptProposal, addCode, addMemo, addReply, createCodebookDoc, createMemosDoc, getMemoBody, proposeCode, removeMemo, updateMemo } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { WRITE_REFUSED, checkWrite } from './write-rules.js';

/** What `change` does to a replica of `server`, as one update, checked as `userId` under `rule`. */
function check(rule: 'own-memos' | 'proposals-only', server: Y.Doc, userId: string, change: (replica: Y.Doc) => void): string | null {
  const replica = new Y.Doc({ gc: false });
  Y.applyUpdate(replica, Y.encodeStateAsUpdate(server));
  const sv = Y.encodeStateVector(replica);
  change(replica);
  const scratch = new Y.Doc({ gc: false });
  Y.applyUpdate(scratch, Y.encodeStateAsUpdate(server));
  return checkWrite(rule, scratch, Y.encodeStateAsUpdate(replica, sv), userId);
}

describe('own-memos', () => {
  const memos = createMemosDoc();
  const ana = addMemo(memos, { author: 'ana', title: 'On the ferry', body: 'Everyone knew the timetable.', attachedTo: { kind: 'study' } });

  it('lets a person add, edit and delete their own memos', () => {
    expect(check('own-memos', memos, 'ben', (d) => addMemo(d, { author: 'ben', body: 'mine', attachedTo: { kind: 'study' } }))).toBeNull();
    expect(check('own-memos', memos, 'ana', (d) => updateMemo(d, ana, { body: 'Everyone knew it by heart.' }))).toBeNull();
    expect(check('own-memos', memos, 'ana', (d) => removeMemo(d, ana))).toBeNull();
  });

  it("refuses editing, deleting or re-authoring someone else's memo, and forging one in their name", () => {
    expect(check('own-memos', memos, 'ben', (d) => getMemoBody(d, ana).insert(0, 'Not true: '))).toBe(WRITE_REFUSED.othersMemo);
    expect(check('own-memos', memos, 'ben', (d) => updateMemo(d, ana, { title: 'x' }))).toBe(WRITE_REFUSED.othersMemo);
    expect(check('own-memos', memos, 'ben', (d) => removeMemo(d, ana))).toBe(WRITE_REFUSED.othersMemo);
    expect(check('own-memos', memos, 'ben', (d) => addMemo(d, { author: 'ana', body: 'forged', attachedTo: { kind: 'study' } }))).toBe(WRITE_REFUSED.forged);
    expect(check('own-memos', memos, 'ana', (d) => (d.getMap('memos').get(ana) as Y.Map<unknown>).set('author', 'ben'))).toBe(WRITE_REFUSED.forged);
    expect(check('own-memos', memos, 'ana', (d) => d.getMap('elsewhere').set('x', 1))).toBe(WRITE_REFUSED.memosOnly);
  });

  it('refuses an update that builds on changes the server does not have', () => {
    const replica = new Y.Doc({ gc: false });
    Y.applyUpdate(replica, Y.encodeStateAsUpdate(memos));
    const sv0 = Y.encodeStateVector(replica);
    const mine = addMemo(replica, { author: 'ana', body: 'a', attachedTo: { kind: 'study' } });
    const sv1 = Y.encodeStateVector(replica);
    getMemoBody(replica, mine).insert(1, 'b');
    const second = Y.encodeStateAsUpdate(replica, sv1);
    const scratch = new Y.Doc({ gc: false });
    Y.applyUpdate(scratch, Y.encodeStateAsUpdate(memos));
    expect(checkWrite('own-memos', scratch, second, 'ana')).toBe(WRITE_REFUSED.notChecked);
    // with the first update landed, the second checks
    const landed = new Y.Doc({ gc: false });
    Y.applyUpdate(landed, Y.encodeStateAsUpdate(memos));
    Y.applyUpdate(landed, Y.encodeStateAsUpdate(replica, sv0));
    expect(checkWrite('own-memos', landed, second, 'ana')).toBeNull();
  });
});

describe('own-memos: replies', () => {
  const memos = createMemosDoc();
  const jotting = addMemo(memos, { kind: 'jotting', author: 'ana', body: 'ask about the ferry timetable', attachedTo: { kind: 'segment', textId: 't1', segmentId: 's1' } });
  const bens = addReply(memos, jotting, { author: 'ben', body: 'P04 says it changed in spring.' });

  it('accepts a reply of one’s own to someone else’s jotting, and its writer’s edit and deletion of it', () => {
    expect(check('own-memos', memos, 'lead', (d) => addReply(d, jotting, { author: 'lead', body: 'Ask P07 as well.' }))).toBeNull();
    expect(check('own-memos', memos, 'ben', (d) => getMemoBody(d, bens).insert(0, 'Correction: '))).toBeNull();
    expect(check('own-memos', memos, 'ben', (d) => removeMemo(d, bens))).toBeNull();
  });

  it('refuses a reply in another’s name, an edit or deletion of another’s reply, and a reply to nothing or to a reply', () => {
    expect(check('own-memos', memos, 'lead', (d) => addReply(d, jotting, { author: 'ben', body: 'forged agreement' }))).toBe(WRITE_REFUSED.forged);
    expect(check('own-memos', memos, 'lead', (d) => getMemoBody(d, bens).insert(0, 'Not so: '))).toBe(WRITE_REFUSED.othersMemo);
    expect(check('own-memos', memos, 'ana', (d) => removeMemo(d, bens))).toBe(WRITE_REFUSED.othersMemo); // not even the jotting's writer
    expect(check('own-memos', memos, 'ana', (d) => (d.getMap('memos').get(bens) as Y.Map<unknown>).set('replyTo', 'm-x'))).toBe(WRITE_REFUSED.othersMemo);
    // built by hand: the model itself refuses these, a crafted client need not
    const raw = (to: string) => (d: Y.Doc) => {
      const m = new Y.Map<unknown>();
      m.set('author', 'lead');
      m.set('replyTo', to);
      m.set('body', new Y.Text('x'));
      d.getMap('memos').set('m-crafted', m);
    };
    expect(check('own-memos', memos, 'lead', raw('m-missing'))).toBe(WRITE_REFUSED.replyNowhere);
    expect(check('own-memos', memos, 'lead', raw(bens))).toBe(WRITE_REFUSED.replyNowhere);
    expect(check('own-memos', memos, 'lead', raw(jotting))).toBeNull();
  });
});

describe('proposals-only', () => {
  const cb = createCodebookDoc();
  const lead = { by: 'lead' };
  const kept = addCode(cb, { label: 'Keeping the hall going' }, lead);
  const old = proposeCode(cb, { label: 'queue for the matinee', author: 'ana', inVivo: true });

  it('lets a coder add a pending proposal of their own', () => {
    expect(check('proposals-only', cb, 'ana', (d) => proposeCode(d, { label: 'Ticket money', author: 'ana' }))).toBeNull();
  });

  it('refuses codes, definitions, decisions, changes to a proposal, and proposals in another name', () => {
    expect(check('proposals-only', cb, 'ana', (d) => addCode(d, { label: 'Sneaked in' }, { by: 'ana' }))).toBe(WRITE_REFUSED.proposalsOnly);
    expect(check('proposals-only', cb, 'ana', (d) => (d.getMap('codes').get(kept) as Y.Map<unknown>).set('label', 'x'))).toBe(WRITE_REFUSED.proposalsOnly);
    expect(check('proposals-only', cb, 'ana', (d) => acceptProposal(d, old, { by: 'ana' }))).toBe(WRITE_REFUSED.proposalsOnly);
    expect(check('proposals-only', cb, 'ana', (d) => (d.getMap('proposals').get(old) as Y.Map<unknown>).set('status', 'accepted'))).toBe(WRITE_REFUSED.proposalNotNew);
    expect(check('proposals-only', cb, 'ana', (d) => proposeCode(d, { label: 'In ben’s name', author: 'ben' }))).toBe(WRITE_REFUSED.proposalForged);
  });
});
