/**
 * Sign-out forgets this person's documents on this device (DESIGN §8): every open document is
 * closed, every IndexedDB database Gloss made (`gloss:<room>`, the offline copies) is deleted, and
 * Gloss's localStorage keys and any Cache Storage entries go too.
 */
import { closeAllDocs } from './open-doc.js';

const PREFIX = 'gloss:';

function deleteDatabase(name: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const req = indexedDB.deleteDatabase(name);
    req.onsuccess = () => resolve();
    req.onerror = () => reject(req.error ?? new Error(`could not delete ${name}`));
    // Blocked means another tab still has it open; the deletion completes when that tab closes it.
    req.onblocked = () => resolve();
  });
}

/** Names of Gloss's IndexedDB databases on this origin. */
export async function localCopies(): Promise<string[]> {
  if (typeof indexedDB === 'undefined' || typeof indexedDB.databases !== 'function') return [];
  return (await indexedDB.databases()).map((d) => d.name ?? '').filter((n) => n.startsWith(PREFIX));
}

/** Unsent local changes counted by pending.ts (they would be lost by forgetting). */
export function unsentChanges(): number {
  let n = 0;
  for (let i = 0; i < localStorage.length; i++) {
    const k = localStorage.key(i) ?? '';
    if (k.startsWith(`${PREFIX}pending:`)) n += Number(localStorage.getItem(k)) || 0;
  }
  return n;
}

export async function forgetLocalCopies(): Promise<void> {
  await closeAllDocs();
  await Promise.all((await localCopies()).map(deleteDatabase));
  for (const k of Object.keys(localStorage)) if (k.startsWith(PREFIX)) localStorage.removeItem(k);
  if (typeof caches !== 'undefined') {
    for (const k of await caches.keys()) await caches.delete(k);
  }
}
