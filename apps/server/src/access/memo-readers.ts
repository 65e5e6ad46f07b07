/**
 * The memos document as one reader may receive it: the sync connection (states and live changes) and
 * the opening request both call these, so one rule (memo-view.ts) and one filter (sync/memo-filter.ts)
 * decide what every route and room sends of it.
 */
import * as Y from 'yjs';
import { filterMemosUpdate } from '../sync/memo-filter.js';
import { entryFacts, mayReadEntry, seesEverything, type MemoReaderView } from './memo-view.js';

/** `update` (whose structs `doc` holds) with the entries `view` withholds replaced by placeholders. */
export function readableMemos(doc: Y.Doc, update: Uint8Array, view: MemoReaderView | undefined): Uint8Array {
  if (view === undefined || seesEverything(view)) return update;
  return filterMemosUpdate(doc, update, (key) => mayReadEntry(view, entryFacts(doc, key)));
}

/** A whole state of the memos document (from the store or a room) as `view` may receive it. */
export function readableMemosState(state: Uint8Array, view: MemoReaderView | undefined): Uint8Array {
  if (view === undefined || seesEverything(view)) return state;
  const doc = new Y.Doc({ gc: false });
  try {
    Y.applyUpdate(doc, state);
    return readableMemos(doc, Y.encodeStateAsUpdate(doc), view);
  } finally {
    doc.destroy();
  }
}
