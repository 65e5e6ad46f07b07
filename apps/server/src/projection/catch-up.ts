/**
 * At start, every layer, codebook and memos document is noted for projection once: documents written
 * without going through the store's append (seeding, imports of whole projects) and documents whose
 * projection failed before a restart then reach the tables too. It runs on the projector's queue, in
 * the background; sync does not wait for it.
 */
import { type Db, documents } from '@gloss/db';
import { inArray } from 'drizzle-orm';
import type { Projector } from './projector.js';

export async function scheduleCatchUp(db: Db, projector: Pick<Projector, 'notify'>): Promise<number> {
  const rows = await db.select({ id: documents.id }).from(documents).where(inArray(documents.kind, ['layer', 'codebook', 'memos']));
  for (const r of rows) projector.notify(r.id);
  return rows.length;
}
