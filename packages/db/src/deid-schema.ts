/**
 * De-identification (DESIGN §8): the study's pseudonym key, kept in a table of its own (never inside
 * the texts) and read by the study's owner only; and the text documents a purge replaced, so a client
 * still holding one of them is told to discard its copy instead of being refused as if it never existed.
 */
import { index, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { studies, texts, users } from './schema.js';

/** One identifier of a study and its pseudonym: the same original gets the same replacement in every text. */
export const pseudonyms = pgTable(
  'pseudonyms',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    /** person, place, organisation, date, age, phone, email, address, listed */
    kind: text('kind').notNull(),
    original: text('original').notNull(),
    pseudonym: text('pseudonym').notNull(),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('pseudonyms_study_original_key').on(t.studyId, t.original), index('pseudonyms_study_idx').on(t.studyId)],
);

/** When the key was exported (it may be exported once) — kept apart so deleting the key keeps the fact. */
export const pseudonymKeyExports = pgTable('pseudonym_key_exports', {
  studyId: uuid('study_id')
    .primaryKey()
    .references(() => studies.id, { onDelete: 'cascade' }),
  exportedBy: uuid('exported_by').references(() => users.id, { onDelete: 'set null' }),
  exportedAt: timestamp('exported_at', { withTimezone: true }).notNull().defaultNow(),
});

/**
 * A document replaced by a purge (a text, layer, codebook or memos document): its id (the old room),
 * the document that replaced it, and every client id that wrote the old one's history (with those of
 * the documents it had replaced in turn), so the rebuilt room can refuse an old copy's structs.
 */
export const retiredDocuments = pgTable(
  'retired_documents',
  {
    id: uuid('id').primaryKey(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    /** The text of a text or layer document; null for the codebook and memos. */
    textId: uuid('text_id').references(() => texts.id, { onDelete: 'cascade' }),
    kind: text('kind').notNull().default('text'),
    replacedBy: uuid('replaced_by').notNull(),
    /** Yjs client ids of the old document's history (numbers). */
    clients: jsonb('clients').$type<number[]>().notNull().default([]),
    retiredAt: timestamp('retired_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('retired_documents_text_idx').on(t.textId), index('retired_documents_replaced_by_idx').on(t.replacedBy)],
);

export type PseudonymRow = typeof pseudonyms.$inferSelect;
