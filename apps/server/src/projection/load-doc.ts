/** A document's current state from the update store, as a fresh Y.Doc (gc off, as every Gloss document). */
import * as Y from 'yjs';
import type { UpdateStore } from '../sync/contracts.js';

export type DocLoader = Pick<UpdateStore, 'load'>;

export async function loadDoc(store: DocLoader, docId: string): Promise<Y.Doc> {
  const { updates } = await store.load(docId);
  const doc = new Y.Doc({ gc: false });
  doc.transact(() => {
    for (const u of updates) Y.applyUpdate(doc, u);
  });
  return doc;
}

/** Loads several documents; destroys them all after `fn` (also when it throws). */
export async function withDocs<T>(store: DocLoader, ids: readonly string[], fn: (docs: Y.Doc[]) => T | Promise<T>): Promise<T> {
  const docs = await Promise.all(ids.map((id) => loadDoc(store, id)));
  try {
    return await fn(docs);
  } finally {
    for (const d of docs) d.destroy();
  }
}
