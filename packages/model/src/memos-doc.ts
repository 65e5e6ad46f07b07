import * as Y from 'yjs';
import { InvalidArgumentError, NotFoundError } from './errors.js';
import { newId, systemClock, type Clock } from './ids.js';
import { replaceText } from './codebook-doc.js';

/** Root of the memos document (DESIGN §2): Y.Map<memoId, Y.Map>. The body is a Y.Text. */
export const MEMOS_ROOT = 'memos';

/**
 * What a memo is about. A segment is named with its text (layer documents are per text). A text
 * attachment may name a passage of it: `start`/`end` are base64 anchors into the text, as a segment's
 * (see memo-passage.ts), so the passage follows edits; readers that do not know them see "the text".
 */
export type MemoAttachment =
  | { kind: 'study' }
  | { kind: 'text'; textId: string; start?: string; end?: string }
  | { kind: 'segment'; textId: string; segmentId: string }
  | { kind: 'code'; codeId: string };

/** A jotting is a quick note made while coding; promoted, it becomes a memo. */
export type MemoKind = 'memo' | 'jotting';

export interface MemoView {
  id: string;
  kind: MemoKind;
  author: string;
  title: string;
  body: string;
  attachedTo: MemoAttachment;
  createdAt: number;
  updatedAt: number;
  /** Set on a reply: the memo or jotting it answers. A reply is an entry of its writer's own (the server's rule is per entry). */
  replyTo?: string;
}

export interface NewMemo {
  kind?: MemoKind;
  author: string;
  title?: string;
  body?: string;
  attachedTo: MemoAttachment;
}

export function createMemosDoc(): Y.Doc {
  return new Y.Doc({ gc: false });
}

const memos = (doc: Y.Doc) => doc.getMap<Y.Map<unknown>>(MEMOS_ROOT);

function checkAttachment(a: MemoAttachment): MemoAttachment {
  const ok =
    a !== null && typeof a === 'object' &&
    ((a.kind === 'study') ||
      (a.kind === 'text' && typeof a.textId === 'string' && (a.start === undefined) === (a.end === undefined) &&
        (a.start === undefined || (typeof a.start === 'string' && typeof a.end === 'string'))) ||
      (a.kind === 'segment' && typeof a.textId === 'string' && typeof a.segmentId === 'string') ||
      (a.kind === 'code' && typeof a.codeId === 'string'));
  if (!ok) throw new InvalidArgumentError('a memo attaches to the study, a text, a segment (textId + segmentId) or a code');
  return { ...a };
}

function requireMemo(doc: Y.Doc, id: string): Y.Map<unknown> {
  const m = memos(doc).get(id);
  if (!(m instanceof Y.Map)) throw new NotFoundError('memo', id);
  return m;
}

export function addMemo(doc: Y.Doc, input: NewMemo, clock: Clock = systemClock): string {
  if (typeof input.author !== 'string' || input.author === '') throw new InvalidArgumentError('a memo needs an author');
  const kind = input.kind ?? 'memo';
  if (kind !== 'memo' && kind !== 'jotting') throw new InvalidArgumentError('kind must be memo or jotting');
  const attachedTo = checkAttachment(input.attachedTo);
  const id = newId('m');
  const now = clock();
  doc.transact(() => {
    const m = new Y.Map<unknown>();
    m.set('kind', kind);
    m.set('author', input.author);
    m.set('title', input.title ?? '');
    m.set('body', new Y.Text(input.body ?? ''));
    m.set('attachedTo', attachedTo);
    m.set('createdAt', now);
    m.set('updatedAt', now);
    memos(doc).set(id, m);
  });
  return id;
}

/** The live body, for an editor binding. */
export function getMemoBody(doc: Y.Doc, id: string): Y.Text {
  return requireMemo(doc, id).get('body') as Y.Text;
}

export function updateMemo(doc: Y.Doc, id: string, patch: { title?: string; body?: string }, clock: Clock = systemClock): void {
  const m = requireMemo(doc, id);
  doc.transact(() => {
    if (patch.title !== undefined) m.set('title', String(patch.title));
    if (patch.body !== undefined) replaceText(m.get('body') as Y.Text, String(patch.body));
    m.set('updatedAt', clock());
  });
}

/** Turn a jotting into a memo, optionally giving it a title. */
export function promoteJotting(doc: Y.Doc, id: string, title?: string, clock: Clock = systemClock): void {
  const m = requireMemo(doc, id);
  if (m.get('kind') !== 'jotting') throw new InvalidArgumentError(`memo ${id} is not a jotting`);
  doc.transact(() => {
    m.set('kind', 'memo');
    if (title !== undefined) m.set('title', title);
    m.set('updatedAt', clock());
  });
}

export function removeMemo(doc: Y.Doc, id: string): void {
  requireMemo(doc, id);
  memos(doc).delete(id);
}

/**
 * Reply to a memo or jotting: a new entry of `author`'s own, with the memo's attachment (so a reply is
 * found with its passage) and `replyTo` naming the memo. Replies answer memos, not other replies.
 */
export function addReply(doc: Y.Doc, memoId: string, input: { author: string; body: string }, clock: Clock = systemClock): string {
  const parent = requireMemo(doc, memoId);
  if (parent.get('replyTo') !== undefined) throw new InvalidArgumentError('reply to the memo itself, not to a reply');
  if (typeof input.body !== 'string' || input.body.trim() === '') throw new InvalidArgumentError('a reply needs some words');
  if (typeof input.author !== 'string' || input.author === '') throw new InvalidArgumentError('a reply needs an author');
  const id = newId('m');
  const now = clock();
  doc.transact(() => {
    const m = new Y.Map<unknown>();
    m.set('kind', 'memo');
    m.set('author', input.author);
    m.set('title', '');
    m.set('body', new Y.Text(input.body));
    m.set('attachedTo', { ...(parent.get('attachedTo') as MemoAttachment) });
    m.set('replyTo', memoId);
    m.set('createdAt', now);
    m.set('updatedAt', now);
    memos(doc).set(id, m);
  });
  return id;
}

/** The replies to a memo, oldest first. */
export function listReplies(doc: Y.Doc, memoId: string): MemoView[] {
  const out: MemoView[] = [];
  memos(doc).forEach((m, id) => {
    if (m instanceof Y.Map && m.get('replyTo') === memoId) out.push(readMemo(id, m));
  });
  return out.sort((x, y) => x.createdAt - y.createdAt || (x.id < y.id ? -1 : 1));
}

function readMemo(id: string, m: Y.Map<unknown>): MemoView {
  const body = m.get('body');
  const replyTo = m.get('replyTo');
  return {
    ...(typeof replyTo === 'string' ? { replyTo } : {}),
    id,
    kind: m.get('kind') === 'jotting' ? 'jotting' : 'memo',
    author: String(m.get('author') ?? ''),
    title: String(m.get('title') ?? ''),
    body: body instanceof Y.Text ? body.toString() : '',
    attachedTo: (m.get('attachedTo') as MemoAttachment) ?? { kind: 'study' },
    createdAt: Number(m.get('createdAt') ?? 0),
    updatedAt: Number(m.get('updatedAt') ?? 0),
  };
}

export function getMemo(doc: Y.Doc, id: string): MemoView {
  return readMemo(id, requireMemo(doc, id));
}

export interface MemoFilter {
  kind?: MemoKind;
  author?: string;
  attachedKind?: MemoAttachment['kind'];
  textId?: string;
  codeId?: string;
  segmentId?: string;
  /** Replies are listed under their memo (listReplies), not as memos of their own, unless this is true (or their memo is gone). */
  replies?: boolean;
}

export function listMemos(doc: Y.Doc, filter: MemoFilter = {}): MemoView[] {
  const out: MemoView[] = [];
  memos(doc).forEach((m, id) => {
    if (!(m instanceof Y.Map)) return;
    const v = readMemo(id, m);
    // a reply whose memo was deleted is listed on its own, so its words stay findable
    if (v.replyTo !== undefined && filter.replies !== true && memos(doc).has(v.replyTo)) return;
    const a = v.attachedTo as Partial<{ kind: string; textId: string; codeId: string; segmentId: string }>;
    if (filter.kind !== undefined && v.kind !== filter.kind) return;
    if (filter.author !== undefined && v.author !== filter.author) return;
    if (filter.attachedKind !== undefined && a.kind !== filter.attachedKind) return;
    if (filter.textId !== undefined && a.textId !== filter.textId) return;
    if (filter.codeId !== undefined && a.codeId !== filter.codeId) return;
    if (filter.segmentId !== undefined && a.segmentId !== filter.segmentId) return;
    out.push(v);
  });
  return out.sort((x, y) => x.createdAt - y.createdAt || (x.id < y.id ? -1 : 1));
}

export interface MemoHit {
  memo: MemoView;
  /** Offsets of each match in the title (field 'title') or body. */
  matches: Array<{ field: 'title' | 'body'; index: number }>;
}

/**
 * Plain search: every whitespace-separated word of the query must occur (case-insensitive substring)
 * in the title or body; hits are ordered by number of matches, then newest first.
 */
export function searchMemos(doc: Y.Doc, query: string, filter: MemoFilter = {}): MemoHit[] {
  const words = String(query).toLowerCase().split(/\s+/).filter(Boolean);
  if (words.length === 0) return [];
  const hits: MemoHit[] = [];
  for (const memo of listMemos(doc, filter)) {
    const title = memo.title.toLowerCase();
    const body = memo.body.toLowerCase();
    const matches: MemoHit['matches'] = [];
    let all = true;
    for (const w of words) {
      let found = false;
      for (const [field, s] of [['title', title], ['body', body]] as const) {
        for (let i = s.indexOf(w); i >= 0; i = s.indexOf(w, i + w.length)) {
          matches.push({ field, index: i });
          found = true;
        }
      }
      if (!found) all = false;
    }
    if (all) hits.push({ memo, matches: matches.sort((a, b) => (a.field === b.field ? a.index - b.index : a.field === 'title' ? -1 : 1)) });
  }
  return hits.sort((a, b) => b.matches.length - a.matches.length || b.memo.updatedAt - a.memo.updatedAt);
}
