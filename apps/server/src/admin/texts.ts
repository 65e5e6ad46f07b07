/** Adding texts to a study and finding or creating a coder's layer on a text. */
import { type Db, documents, texts, updates } from '@gloss/db';
import type { Transcript } from '@gloss/model';
import { and, eq, isNull } from 'drizzle-orm';
import { AdminError } from './errors.js';
import { recordAudit } from './audit.js';
import { buildTextDocUpdate, wordCount } from './text-doc.js';

export interface NewText {
  title: string;
  transcript: Transcript;
  /** Where it came from: 'txt', 'vtt', 'srt', 'docx', 'api'… */
  sourceFormat: string;
  createdBy: string | null;
}

/**
 * Creates the text row and its text document, whose first state goes in as the document's first
 * log update (the store reads snapshots only above seq 0, and compaction folds the log later).
 */
export async function addTextFromTranscript(db: Db, studyId: string, input: NewText) {
  if (input.transcript.turns.length === 0) throw new AdminError('invalid_input', 'The transcript has no words.');
  const { update, text } = buildTextDocUpdate(input.transcript);
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [row] = await t
      .insert(texts)
      .values({ studyId, title: input.title, sourceFormat: input.sourceFormat, wordCount: wordCount(text), createdBy: input.createdBy })
      .returning();
    const [doc] = await t.insert(documents).values({ kind: 'text', studyId, textId: row!.id }).returning({ id: documents.id });
    await t.insert(updates).values({ docId: doc!.id, data: update, bytes: update.byteLength, userId: input.createdBy });
    await recordAudit(t, {
      userId: input.createdBy,
      studyId,
      action: 'text.import',
      target: row!.id,
      detail: { title: input.title, sourceFormat: input.sourceFormat, words: row!.wordCount },
    });
    return { ...row!, room: doc!.id };
  });
}

/** The layer document of `coderId` on a text outside rounds, created on first use (race-safe via the unique index). */
export async function ensureLayer(db: Db, studyId: string, textId: string, coderId: string): Promise<string> {
  await db.insert(documents).values({ kind: 'layer', studyId, textId, coderId }).onConflictDoNothing();
  const [row] = await db
    .select({ id: documents.id })
    .from(documents)
    .where(and(eq(documents.kind, 'layer'), eq(documents.textId, textId), eq(documents.coderId, coderId), isNull(documents.roundId)));
  return row!.id;
}
