/** Invented rows that the update log's foreign keys need: one user, one study, N codebook-less documents. */
import { randomUUID } from 'node:crypto';
import { documents, studies, texts, users, type Database } from '@gloss/db';

export interface Fixture {
  userId: string;
  docIds: string[];
}

/** Creates a user and `count` text documents (kind 'text', one text each). */
export async function seedDocuments(database: Database, count: number): Promise<Fixture> {
  const userId = randomUUID();
  const studyId = randomUUID();
  await database.db.insert(users).values({ id: userId, email: `coder-${userId}@example.test`, name: 'Ines Varga', passwordHash: 'x' });
  await database.db.insert(studies).values({ id: studyId, title: 'Allotment gardens and neighbourliness', createdBy: userId });
  const docIds: string[] = [];
  for (let i = 0; i < count; i++) {
    const textId = randomUUID();
    const docId = randomUUID();
    await database.db.insert(texts).values({ id: textId, studyId, title: `Interview ${i + 1}`, sourceFormat: 'txt' });
    await database.db.insert(documents).values({ id: docId, kind: 'text', studyId, textId });
    docIds.push(docId);
  }
  return { userId, docIds };
}
