/** Full decode of a client's Yjs update before anything is stored (a bad update must never reach the log). */
import * as Y from 'yjs';
import { CloseCode, SyncError } from './errors.js';

/** Throws SyncError('invalid-update') unless the bytes decode as a v1 update; returns whether it carries anything. */
export function checkUpdate(update: Uint8Array): { empty: boolean } {
  try {
    const decoded = Y.decodeUpdate(update);
    return { empty: decoded.structs.length === 0 && decoded.ds.clients.size === 0 };
  } catch (cause) {
    throw new SyncError('invalid-update', 'update does not decode', CloseCode.invalidPayload, { cause });
  }
}

/** Whether the update carries a struct written by one of `clients` (a document's retired history). */
export function carriesClient(update: Uint8Array, clients: readonly number[]): boolean {
  const set = new Set(clients);
  return Y.decodeUpdate(update).structs.some((s) => set.has(s.id.client));
}
