/** Test helper: changes a stored document as a client would, without a room or a projector. */
import * as Y from 'yjs';
import { loadDoc } from '../../apps/server/src/projection/load-doc.js';
import type { UpdateStore } from '../../apps/server/src/sync/contracts.js';

/** Applies `fn` to a copy of the stored document and appends exactly the update it made. */
export async function appendChange(store: UpdateStore, docId: string, fn: (doc: Y.Doc) => void): Promise<void> {
  const doc = await loadDoc(store, docId);
  const before = Y.encodeStateVector(doc);
  fn(doc);
  await store.append(docId, Y.encodeStateAsUpdate(doc, before), null);
  doc.destroy();
}
