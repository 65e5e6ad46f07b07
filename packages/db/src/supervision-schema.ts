/**
 * Supervision of trainees (issue 9): which texts a lead assigned to whom, the review state of each
 * assignment, the reference layer chosen per text, and a study's supervision settings. A trainee
 * reads only texts assigned to them (or of a round they take part in); access/policy.ts decides.
 */
import { check, index, pgTable, primaryKey, real, text, timestamp, uuid, integer, boolean } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';
import { documents, studies, texts, users } from './schema.js';

export const REVIEW_STATES = ['assigned', 'returned', 'accepted'] as const;
export type ReviewState = (typeof REVIEW_STATES)[number];

export const textAssignments = pgTable(
  'text_assignments',
  {
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    assignedBy: uuid('assigned_by').references(() => users.id, { onDelete: 'set null' }),
    assignedAt: timestamp('assigned_at', { withTimezone: true }).notNull().defaultNow(),
    /** assigned (being coded), returned (with feedback: look again), accepted. */
    reviewState: text('review_state', { enum: REVIEW_STATES }).notNull().default('assigned'),
    /** The supervisor's words on what to look at again (with a return) or a closing word (with an accept). */
    reviewNote: text('review_note').notNull().default(''),
    reviewedBy: uuid('reviewed_by').references(() => users.id, { onDelete: 'set null' }),
    reviewedAt: timestamp('reviewed_at', { withTimezone: true }),
    /** The supervisor shared the comparison: the assignee may read the text's reference layer. */
    comparisonShared: boolean('comparison_shared').notNull().default(false),
  },
  (t) => [
    primaryKey({ columns: [t.textId, t.userId] }),
    index('text_assignments_user_idx').on(t.userId),
    index('text_assignments_study_idx').on(t.studyId),
    check('text_assignments_state_check', sql`${t.reviewState} in ('assigned', 'returned', 'accepted')`),
  ],
);

/** The layer a text's trainees are compared with: the supervisor's own, another coder's, or a round's consensus layer. */
export const textReferences = pgTable('text_references', {
  textId: uuid('text_id')
    .primaryKey()
    .references(() => texts.id, { onDelete: 'cascade' }),
  layerDocId: uuid('layer_doc_id')
    .notNull()
    .references(() => documents.id, { onDelete: 'cascade' }),
  chosenBy: uuid('chosen_by').references(() => users.id, { onDelete: 'set null' }),
  chosenAt: timestamp('chosen_at', { withTimezone: true }).notNull().defaultNow(),
});

/** Per-study supervision settings: the boundary tolerance (words) and the drift threshold. */
export const supervisionSettings = pgTable('supervision_settings', {
  studyId: uuid('study_id')
    .primaryKey()
    .references(() => studies.id, { onDelete: 'cascade' }),
  toleranceWords: integer('tolerance_words').notNull().default(2),
  /** A trainee's agreement falling by more than this from one round to the next is flagged as drift. */
  driftThreshold: real('drift_threshold').notNull().default(0.1),
});
