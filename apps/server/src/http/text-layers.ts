/**
 * The documents of a text that a member may read: the text itself and the visible layers — those
 * outside rounds and those of the open round the text is in, as the access rules allow (a participant
 * coding independently sees only their own).
 */
import { type Db, documents } from '@gloss/db';
import { and, eq, isNull, or } from 'drizzle-orm';
import { documentAccess, type DocSupervision } from '../access/policy.js';
import { supervisionFor } from '../access/supervision.js';
import { openRoundOfText, type RoundFacts } from '../access/rounds.js';
import { notFound } from '../errors.js';
import type { Role } from '../sync/contracts.js';

export interface VisibleLayer {
  layerDocId: string;
  /** null: a round's consensus layer. */
  coderId: string | null;
  roundId?: string | null;
}

/** The coder a layer's segments are compared as: its coder, or one pseudo-coder for a consensus layer. */
export const comparedAs = (l: { coderId: string | null; layerDocId: string }) => l.coderId ?? `consensus:${l.layerDocId}`;

/** `known`: the person's supervision facts for this text when the caller has read them already (textRoleOf does). */
export async function textDocuments(db: Db, textId: string, role: Role, userId: string, known?: DocSupervision): Promise<{ textDocId: string; layers: VisibleLayer[]; openRound: RoundFacts | null }> {
  const openRound = await openRoundOfText(db, textId);
  const docs = await db
    .select()
    .from(documents)
    .where(and(eq(documents.textId, textId), openRound ? or(isNull(documents.roundId), eq(documents.roundId, openRound.id)) : isNull(documents.roundId)));
  const text = docs.find((d) => d.kind === 'text');
  if (!text) throw notFound('Text document');
  const supervision = known ?? (await supervisionFor(db, textId, userId));
  // A text the person may not read (a trainee's unassigned text) shows them no layer at all.
  if (!documentAccess(role, text, userId, { openRound, layerRound: null }, supervision).read) return { textDocId: text.id, layers: [], openRound };
  const layers: VisibleLayer[] = docs
    .filter((d) => d.kind === 'layer' && documentAccess(role, d, userId, { openRound, layerRound: d.roundId ? openRound : null }, supervision).read)
    .map((d) => ({ layerDocId: d.id, coderId: d.coderId, roundId: d.roundId }));
  return { textDocId: text.id, layers, openRound };
}

export async function codebookDocId(db: Db, studyId: string): Promise<string | null> {
  const [row] = await db
    .select({ id: documents.id })
    .from(documents)
    .where(and(eq(documents.studyId, studyId), eq(documents.kind, 'codebook')));
  return row?.id ?? null;
}
