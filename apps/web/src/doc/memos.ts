/**
 * The study's memos document: root Y.Map "memos" (memo id -> Y.Map). A memo or jotting is attached
 * to the study, a text, a segment or a code; its body is a Y.Text. Jottings are short notes on a
 * selection, made while coding; they can be promoted to memos.
 */
import * as Y from 'yjs';
import { newId } from './segments.js';

export type AttachKind = 'study' | 'text' | 'segment' | 'code';
export interface Attach { kind: AttachKind; id: string; textId?: string; quote?: string }
export interface Memo {
  id: string;
  kind: 'memo' | 'jotting';
  title: string;
  body: string;
  authorId: string;
  authorName: string;
  attach: Attach;
  createdAt: number;
}

export class MemoError extends Error {
  constructor(readonly code: 'no_such_memo' | 'not_yours' | 'empty', message: string) {
    super(message);
    this.name = 'MemoError';
  }
}

export const memosOf = (d: Y.Doc): Y.Map<Y.Map<unknown>> => d.getMap('memos');

export function readMemos(d: Y.Doc): Memo[] {
  const out: Memo[] = [];
  memosOf(d).forEach((m, id) => {
    const body = m.get('body');
    out.push({
      id,
      kind: m.get('kind') === 'jotting' ? 'jotting' : 'memo',
      title: String(m.get('title') ?? ''),
      body: body instanceof Y.Text ? body.toString() : String(body ?? ''),
      authorId: String(m.get('authorId') ?? ''),
      authorName: String(m.get('authorName') ?? ''),
      attach: (m.get('attach') as Attach | undefined) ?? { kind: 'study', id: '' },
      createdAt: Number(m.get('createdAt') ?? 0),
    });
  });
  return out.sort((a, b) => b.createdAt - a.createdAt);
}

export function addMemo(d: Y.Doc, p: { kind: 'memo' | 'jotting'; title: string; body: string; authorId: string; authorName: string; attach: Attach }): string {
  if (!p.body.trim() && !p.title.trim()) throw new MemoError('empty', 'Write something first.');
  const id = newId();
  d.transact(() => {
    const m = new Y.Map<unknown>();
    memosOf(d).set(id, m);
    m.set('kind', p.kind);
    m.set('title', p.title.trim());
    m.set('body', new Y.Text(p.body));
    m.set('authorId', p.authorId);
    m.set('authorName', p.authorName);
    m.set('attach', p.attach);
    m.set('createdAt', Date.now());
  });
  return id;
}

export function memoBody(d: Y.Doc, id: string): Y.Text {
  const m = memosOf(d).get(id);
  if (!m) throw new MemoError('no_such_memo', 'That memo is gone.');
  const b = m.get('body');
  if (b instanceof Y.Text) return b;
  const t = new Y.Text(String(b ?? ''));
  m.set('body', t);
  return t;
}

export function promoteJotting(d: Y.Doc, id: string, userId: string, title: string): void {
  const m = memosOf(d).get(id);
  if (!m) throw new MemoError('no_such_memo', 'That jotting is gone.');
  if (m.get('authorId') !== userId) throw new MemoError('not_yours', 'Only its author can promote a jotting.');
  d.transact(() => {
    m.set('kind', 'memo');
    if (title.trim()) m.set('title', title.trim());
  });
}

export function deleteMemo(d: Y.Doc, id: string, userId: string): void {
  const m = memosOf(d).get(id);
  if (!m) throw new MemoError('no_such_memo', 'That memo is gone.');
  if (m.get('authorId') !== userId) throw new MemoError('not_yours', 'Only its author can delete a memo.');
  memosOf(d).delete(id);
}

export function search(memos: Memo[], q: string): Memo[] {
  const words = q.toLowerCase().split(/\s+/).filter(Boolean);
  if (words.length === 0) return memos;
  return memos.filter((m) => {
    const hay = `${m.title}\n${m.body}\n${m.authorName}\n${m.attach.quote ?? ''}`.toLowerCase();
    return words.every((w) => hay.includes(w));
  });
}
