/**
 * Server-made changes to a document (a round's stamp in the codebook): the change is made on the
 * document's stored state and only the difference is written, through the sync layer, so open rooms
 * and other nodes receive it as any edit.
 */
import * as Y from 'yjs';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { DocState } from '../sync/index.js';

export interface DocWriter {
  write(docId: string, update: Uint8Array, userId: string | null): Promise<void>;
  /** An update committed outside sync (an import): to the open rooms of every node (sync `announce`). */
  announce(docId: string, seq: number, update: Uint8Array): Promise<void>;
  /**
   * The document's whole state, or with `since` what it gained since that state vector, and its state
   * vector, from its room (sync `state`: the room stays open `holdMs` for the sockets that follow).
   */
  state(docId: string, holdMs: number, since?: Uint8Array): Promise<DocState>;
}

/** Applies `change` to the stored document; writes and returns true when it changed anything. */
export async function changeDoc(store: DocLoader, writer: DocWriter, docId: string, userId: string | null, change: (doc: Y.Doc) => void): Promise<boolean> {
  const doc = await loadDoc(store, docId);
  try {
    const before = Y.encodeStateVector(doc);
    change(doc);
    const diff = Y.encodeStateAsUpdate(doc, before);
    if (isEmpty(diff)) return false;
    await writer.write(docId, diff, userId);
    return true;
  } finally {
    doc.destroy();
  }
}

/** An update that carries neither structs nor deletions. */
function isEmpty(update: Uint8Array): boolean {
  const { structs, ds } = Y.decodeUpdate(update);
  return structs.length === 0 && ds.clients.size === 0;
}
