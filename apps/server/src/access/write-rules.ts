/**
 * Per-update write rules for documents a person may write only in part (the memos document: their
 * own memos; the codebook, for a coder: new proposals of their own). The sync connection calls
 * `checkWrite` on every update of a connection whose grant carries a rule, before anything is stored.
 *
 * How: the update is applied to a scratch copy of the document (the room's state plus updates still in
 * flight); the transaction's `changed` types are walked up to their root and top-level key, so we know
 * exactly which memos / proposals the update touches (an insertion into a memo's body, a field set, a
 * deletion); each touched entry is then compared with what it was before. A reply to a memo is an entry
 * of the replier's own (with `replyTo`), so the same rule keeps anyone from editing or forging it. The copy is then thrown away:
 * the room applies the real update only after it is stored. An update that cannot be applied in full
 * (it depends on changes the server does not have) is refused too: it could not be checked.
 */
import * as Y from 'yjs';
import { MEMOS_ROOT, PROPOSALS_ROOT } from '@gloss/model';
import type { WriteRule } from '../sync/contracts.js';

export const WRITE_REFUSED = {
  notChecked: 'This change could not be checked (it builds on changes the server does not have). Reload and try again.',
  othersMemo: "You can only write your own memos: this change touched someone else's memo.",
  forged: 'A memo must carry your own name as its author.',
  memosOnly: 'The memos document holds only memos.',
  fixedPlace: 'A memo keeps the place it was written on (what it is attached to, whom it answers); write a new one instead.',
  replyNowhere: 'A reply must answer a memo or jotting that exists (not another reply).',
  proposalsOnly: 'You may only propose codes: ask the lead to change the codebook.',
  proposalNotNew: 'A proposal cannot be changed once made; the lead decides it.',
  proposalForged: 'A proposal must be yours and pending.',
} as const;

/** Root name -> top-level keys touched (null: the root itself changed without a key, e.g. an array). */
type Touched = Map<string, Set<string | null>>;

function touchedBy(doc: Y.Doc, update: Uint8Array): Touched | null {
  const names = new Map<Y.AbstractType<any>, string>();
  const touched: Touched = new Map();
  const note = (tr: Y.Transaction) => {
    for (const [type, keys] of tr.changed) {
      let t: Y.AbstractType<any> = type;
      let key: string | null = null;
      let nested = false;
      while (t._item !== null) {
        key = t._item.parentSub;
        t = t._item.parent as Y.AbstractType<any>;
        nested = true;
      }
      if (names.size === 0 || !names.has(t)) for (const [n, r] of doc.share) names.set(r as Y.AbstractType<any>, n);
      const root = names.get(t) ?? '?';
      const set = touched.get(root) ?? new Set<string | null>();
      touched.set(root, set);
      if (nested) set.add(key);
      else for (const k of keys) set.add(k);
    }
  };
  doc.on('afterTransaction', note);
  try {
    Y.applyUpdate(doc, update);
  } finally {
    doc.off('afterTransaction', note);
  }
  if (doc.store.pendingStructs !== null || doc.store.pendingDs !== null) return null;
  return touched;
}

const authorOf = (m: unknown): string | undefined => (m instanceof Y.Map ? (m.get('author') as string | undefined) : undefined);

/**
 * The items that fix where an entry is read (its map item, its attachment, author and replyTo fields):
 * who may receive an entry follows from them (memo-view.ts), so they may not change once written.
 */
function placeOf(root: Y.Map<unknown>, id: string): unknown[] {
  const item = (root as unknown as { _map: Map<string, Y.Item> })._map.get(id);
  const m = root.get(id);
  const fields = m instanceof Y.Map ? (m as unknown as { _map: Map<string, Y.Item> })._map : new Map<string, Y.Item>();
  return [item, fields.get('attachedTo'), fields.get('author'), fields.get('replyTo')];
}

/**
 * null when `update` keeps to `rule` for `userId`; otherwise the refusal in plain words.
 * `scratch` is a copy of the document the caller gives up (it is changed here).
 */
export function checkWrite(rule: WriteRule, scratch: Y.Doc, update: Uint8Array, userId: string): string | null {
  const root = rule === 'own-memos' ? MEMOS_ROOT : PROPOSALS_ROOT;
  const entries = scratch.getMap<unknown>(root);
  // what each entry was before (authors of memos; which proposals already existed)
  const before = new Map<string, string | undefined>();
  const places = new Map<string, unknown[]>();
  entries.forEach((m, id) => {
    before.set(id, authorOf(m));
    if (rule === 'own-memos') places.set(id, placeOf(entries, id));
  });
  const touched = touchedBy(scratch, update);
  if (touched === null) return WRITE_REFUSED.notChecked;
  for (const [name, keys] of touched) {
    if (name !== root) return rule === 'own-memos' ? WRITE_REFUSED.memosOnly : WRITE_REFUSED.proposalsOnly;
    for (const key of keys) {
      if (key === null) return rule === 'own-memos' ? WRITE_REFUSED.memosOnly : WRITE_REFUSED.proposalsOnly;
      const after = entries.get(key);
      if (rule === 'own-memos') {
        if (before.has(key) && before.get(key) !== userId) return WRITE_REFUSED.othersMemo;
        if (after !== undefined && authorOf(after) !== userId) return WRITE_REFUSED.forged;
        const place = places.get(key);
        if (place !== undefined && after !== undefined && placeOf(entries, key).some((item, i) => item !== place[i])) return WRITE_REFUSED.fixedPlace;
        // a new reply (an entry of one's own with replyTo) must answer a memo that is there, not a reply
        if (!before.has(key) && after instanceof Y.Map && after.get('replyTo') !== undefined) {
          const to = after.get('replyTo');
          const parent = typeof to === 'string' && to !== key ? entries.get(to) : undefined;
          if (!(parent instanceof Y.Map) || parent.get('replyTo') !== undefined) return WRITE_REFUSED.replyNowhere;
        }
      } else {
        if (before.has(key)) return WRITE_REFUSED.proposalNotNew;
        if (!(after instanceof Y.Map) || after.get('author') !== userId || after.get('status') !== 'pending') return WRITE_REFUSED.proposalForged;
      }
    }
  }
  return null;
}
