/** What the update log holds for a room, read straight from PostgreSQL (not through a server). */
import { openDatabase } from '@gloss/db';
import * as Y from 'yjs';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import { tokensIn } from './storm.js';

export async function tokensInDatabase(databaseUrl: string, room: string): Promise<{ tokens: Set<string>; memos: number }> {
  const database = await openDatabase({ databaseUrl, maxConnections: 2 }) // 1 would deadlock: migrations reserve one connection and run on another;
  const store = createPgUpdateStore(database, {});
  try {
    const { updates } = await store.load(room);
    const doc = new Y.Doc({ gc: false });
    for (const u of updates) Y.applyUpdate(doc, u);
    return { tokens: tokensIn(doc), memos: doc.getMap('memos').size };
  } finally {
    await store.close();
    await database.close();
  }
}
