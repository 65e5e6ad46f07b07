/** The documents of a text that a member may read: the text itself and the visible layers. */
import { type Db, documents } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import { roomAccess } from '../access/policy.js';
import { notFound } from '../errors.js';
import type { Role } from '../sync/contracts.js';

export interface VisibleLayer {
  layerDocId: string;
  coderId: string;
}

export async function textDocuments(db: Db, textId: string, role: Role, userId: string) {
  const docs = await db.select().from(documents).where(eq(documents.textId, textId));
  const text = docs.find((d) => d.kind === 'text');
  if (!text) throw notFound('Text document');
  const layers: VisibleLayer[] = docs
    .filter((d) => d.kind === 'layer' && roomAccess(role, { kind: 'layer', coderId: d.coderId }, userId).read)
    .map((d) => ({ layerDocId: d.id, coderId: d.coderId! }));
  return { textDocId: text.id, layers };
}

export async function codebookDocId(db: Db, studyId: string): Promise<string | null> {
  const [row] = await db
    .select({ id: documents.id })
    .from(documents)
    .where(and(eq(documents.studyId, studyId), eq(documents.kind, 'codebook')));
  return row?.id ?? null;
}
