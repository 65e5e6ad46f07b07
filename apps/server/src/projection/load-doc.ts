/** A document's current state from the update store, as a fresh Y.Doc (gc off, as every Gloss document). */
import * as Y from 'yjs';
import type { UpdateStore } from '../sync/contracts.js';

export type DocLoader = Pick<UpdateStore, 'load'>;

/** The document and the highest log sequence number its state includes. */
export async function loadDocAt(store: DocLoader, docId: string): Promise<{ doc: Y.Doc; seq: number }> {
  const { updates, seq } = await store.load(docId);
  const doc = new Y.Doc({ gc: false });
  doc.transact(() => {
    for (const u of updates) Y.applyUpdate(doc, u);
  });
  return { doc, seq };
}

export async function loadDoc(store: DocLoader, docId: string): Promise<Y.Doc> {
  return (await loadDocAt(store, docId)).doc;
}

/** Loads several documents; destroys them all after `fn` (also when it throws). `seqs[i]` is docs[i]'s. */
export async function withDocs<T>(store: DocLoader, ids: readonly string[], fn: (docs: Y.Doc[], seqs: number[]) => T | Promise<T>): Promise<T> {
  const loaded = await Promise.all(ids.map((id) => loadDocAt(store, id)));
  try {
    return await fn(
      loaded.map((l) => l.doc),
      loaded.map((l) => l.seq),
    );
  } finally {
    for (const l of loaded) l.doc.destroy();
  }
}
