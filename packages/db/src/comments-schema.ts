/**
 * Threaded comments on segments (supervision feedback and team discussion). A thread starts with a
 * root comment on one segment of one layer; replies point at the root. The author is always the
 * signed-in person who wrote it (stamped by the server), never a value sent by a client.
 */
import { index, pgTable, text, timestamp, uuid, type AnyPgColumn } from 'drizzle-orm/pg-core';
import { documents, studies, texts, users } from './schema.js';

export const segmentComments = pgTable(
  'segment_comments',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    layerDocId: uuid('layer_doc_id')
      .notNull()
      .references(() => documents.id, { onDelete: 'cascade' }),
    /** The model's segment id within the layer document. */
    segmentId: text('segment_id').notNull(),
    /** The thread's root comment; null for the root itself. */
    parentId: uuid('parent_id').references((): AnyPgColumn => segmentComments.id, { onDelete: 'cascade' }),
    authorId: uuid('author_id').references(() => users.id, { onDelete: 'set null' }),
    body: text('body').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Roots only: when and by whom the thread was marked resolved (null while open). */
    resolvedAt: timestamp('resolved_at', { withTimezone: true }),
    resolvedBy: uuid('resolved_by').references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [
    index('segment_comments_text_idx').on(t.textId),
    index('segment_comments_segment_idx').on(t.layerDocId, t.segmentId),
    index('segment_comments_parent_idx').on(t.parentId),
  ],
);

export type SegmentCommentRow = typeof segmentComments.$inferSelect;
