/**
 * The one drizzle schema, shared by PGlite and PostgreSQL. Migrations under ../migrations are generated
 * from this file with `pnpm --filter @gloss/db generate`; never edit them by hand.
 * Projection tables (segments, codes, memos, cases/attributes) come later and go beside these.
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  bigserial,
  index,
  integer,
  jsonb,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  check,
} from 'drizzle-orm/pg-core';
import { bytea } from './bytea.js';

export const ROLES = ['owner', 'lead', 'coder', 'trainee', 'observer'] as const;
export const DOC_KINDS = ['text', 'layer', 'codebook', 'memos'] as const;
export const STUDY_MODES = ['standard', 'reflexive'] as const;
export const ROUND_PHASES = ['independent', 'revealed', 'closed'] as const;

const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();

export const users = pgTable(
  'users',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    passwordHash: text('password_hash').notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('users_email_key').on(t.email),
    // Emails are stored lower-cased so the unique index is case-insensitive in effect.
    check('users_email_lower', sql`${t.email} = lower(${t.email})`),
  ],
);

export const sessions = pgTable(
  'sessions',
  {
    /** Hex SHA-256 of the cookie token: a leaked table does not yield usable tokens. */
    id: text('id').primaryKey(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);

export const studies = pgTable(
  'studies',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    title: text('title').notNull(),
    description: text('description').notNull().default(''),
    mode: text('mode', { enum: STUDY_MODES }).notNull().default('standard'),
    retentionUntil: timestamp('retention_until', { withTimezone: true }),
    /** The study's own record of its ethics approval and consent terms (free text; DESIGN §8). */
    ethicsNote: text('ethics_note').notNull().default(''),
    /** Set when the study is archived: it leaves the working list but keeps its data. */
    archivedAt: timestamp('archived_at', { withTimezone: true }),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [check('studies_mode_check', sql`${t.mode} in ('standard', 'reflexive')`)],
);

export const memberships = pgTable(
  'memberships',
  {
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: text('role', { enum: ROLES }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    primaryKey({ columns: [t.studyId, t.userId] }),
    index('memberships_user_idx').on(t.userId),
    check('memberships_role_check', sql`${t.role} in ('owner', 'lead', 'coder', 'trainee', 'observer')`),
  ],
);

export const texts = pgTable(
  'texts',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    title: text('title').notNull(),
    sourceFormat: text('source_format').notNull(),
    wordCount: integer('word_count').notNull().default(0),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('texts_study_idx').on(t.studyId)],
);

/**
 * A calibration round (issue 8): texts coded independently by its participants, then revealed and
 * compared, then closed. `number` counts the study's rounds from 1; it is the round number the
 * codebook document's change log stamps definition edits with once the round is revealed.
 */
export const rounds = pgTable(
  'rounds',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    name: text('name').notNull(),
    purpose: text('purpose').notNull().default(''),
    /** Unit of comparison: turn, paragraph, sentence, character or span (free spans). */
    unit: text('unit').notNull(),
    statistic: text('statistic').notNull(),
    phase: text('phase', { enum: ROUND_PHASES }).notNull().default('independent'),
    /** The codebook in force when the round started, kept as a named version. */
    codebookVersionId: uuid('codebook_version_id'),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    revealedAt: timestamp('revealed_at', { withTimezone: true }),
    closedAt: timestamp('closed_at', { withTimezone: true }),
  },
  (t) => [
    uniqueIndex('rounds_study_number_key').on(t.studyId, t.number),
    check('rounds_phase_check', sql`${t.phase} in ('independent', 'revealed', 'closed')`),
  ],
);

export const roundTexts = pgTable(
  'round_texts',
  {
    roundId: uuid('round_id')
      .notNull()
      .references(() => rounds.id, { onDelete: 'cascade' }),
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    position: integer('position').notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.roundId, t.textId] }), index('round_texts_text_idx').on(t.textId)],
);

export const roundParticipants = pgTable(
  'round_participants',
  {
    roundId: uuid('round_id')
      .notNull()
      .references(() => rounds.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.roundId, t.userId] }), index('round_participants_user_idx').on(t.userId)],
);

/** A participant's "done" mark on one text of a round. */
export const roundDone = pgTable(
  'round_done',
  {
    roundId: uuid('round_id')
      .notNull()
      .references(() => rounds.id, { onDelete: 'cascade' }),
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    doneAt: timestamp('done_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.roundId, t.textId, t.userId] })],
);

/**
 * How much of a round text a participant has read: the words of the speaker turns that have been on
 * their screen in the round's coding view (reported by their browser; only ever grows).
 */
export const roundReading = pgTable(
  'round_reading',
  {
    roundId: uuid('round_id')
      .notNull()
      .references(() => rounds.id, { onDelete: 'cascade' }),
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    wordsRead: integer('words_read').notNull().default(0),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.roundId, t.textId, t.userId] })],
);

/**
 * One row per Y.Doc; its id is the sync room name. A layer belongs to a round when `round_id` is set;
 * a round's consensus layer is the layer of a round with no coder (`coder_id` null), written by the
 * lead and owner only. Layers outside rounds always have a coder.
 */
export const documents = pgTable(
  'documents',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    kind: text('kind', { enum: DOC_KINDS }).notNull(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    textId: uuid('text_id').references(() => texts.id, { onDelete: 'cascade' }),
    coderId: uuid('coder_id').references(() => users.id, { onDelete: 'cascade' }),
    roundId: uuid('round_id').references(() => rounds.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
  },
  (t) => [
    check('documents_kind_check', sql`${t.kind} in ('text', 'layer', 'codebook', 'memos')`),
    // Shape per kind: text -> text_id only; layer -> text_id and (coder_id, or a round for a consensus
    // layer); codebook/memos -> neither. Only layers belong to rounds.
    check(
      'documents_shape_check',
      sql`(${t.kind} = 'text' and ${t.textId} is not null and ${t.coderId} is null and ${t.roundId} is null)
        or (${t.kind} = 'layer' and ${t.textId} is not null and (${t.coderId} is not null or ${t.roundId} is not null))
        or (${t.kind} in ('codebook', 'memos') and ${t.textId} is null and ${t.coderId} is null and ${t.roundId} is null)`,
    ),
    // One layer per text per coder outside rounds; one per text per coder per round; one consensus layer per text per round.
    uniqueIndex('documents_layer_key').on(t.textId, t.coderId).where(sql`${t.kind} = 'layer' and ${t.roundId} is null`),
    uniqueIndex('documents_round_layer_key')
      .on(t.roundId, t.textId, t.coderId)
      .where(sql`${t.kind} = 'layer' and ${t.roundId} is not null and ${t.coderId} is not null`),
    uniqueIndex('documents_consensus_key').on(t.roundId, t.textId).where(sql`${t.kind} = 'layer' and ${t.coderId} is null`),
    uniqueIndex('documents_text_key').on(t.textId).where(sql`${t.kind} = 'text'`),
    uniqueIndex('documents_study_kind_key').on(t.studyId, t.kind).where(sql`${t.kind} in ('codebook', 'memos')`),
    index('documents_study_idx').on(t.studyId),
    index('documents_round_idx').on(t.roundId),
  ],
);

/** Append-only Yjs update log. */
export const updates = pgTable(
  'updates',
  {
    seq: bigserial('seq', { mode: 'number' }).primaryKey(),
    docId: uuid('doc_id')
      .notNull()
      .references(() => documents.id, { onDelete: 'cascade' }),
    data: bytea('data').notNull(),
    bytes: integer('bytes').notNull(),
    userId: uuid('user_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('updates_doc_seq_idx').on(t.docId, t.seq)],
);

/** The log folded up to `seq` (inclusive). */
export const snapshots = pgTable('snapshots', {
  docId: uuid('doc_id')
    .primaryKey()
    .references(() => documents.id, { onDelete: 'cascade' }),
  seq: bigint('seq', { mode: 'number' }).notNull(),
  data: bytea('data').notNull(),
  bytes: integer('bytes').notNull(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});

/** Named Yjs snapshots (Y.encodeSnapshot) of a document, for looking back. */
export const versions = pgTable(
  'versions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    docId: uuid('doc_id')
      .notNull()
      .references(() => documents.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    snapshot: bytea('snapshot').notNull(),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('versions_doc_idx').on(t.docId)],
);

export const LINK_PURPOSES = ['invite', 'reset'] as const;

/**
 * Single-use, expiring links: an invitation to a study (email + role) or a password reset (user).
 * Only the SHA-256 of the link's token is stored, like session ids.
 */
export const accountLinks = pgTable(
  'account_links',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    tokenHash: text('token_hash').notNull(),
    purpose: text('purpose', { enum: LINK_PURPOSES }).notNull(),
    email: text('email').notNull(),
    studyId: uuid('study_id').references(() => studies.id, { onDelete: 'cascade' }),
    role: text('role', { enum: ROLES }),
    userId: uuid('user_id').references(() => users.id, { onDelete: 'cascade' }),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('account_links_token_key').on(t.tokenHash),
    index('account_links_study_idx').on(t.studyId),
    check('account_links_purpose_check', sql`${t.purpose} in ('invite', 'reset')`),
    // An invitation names a study and a role; a reset names an account.
    check(
      'account_links_shape_check',
      sql`(${t.purpose} = 'invite' and ${t.studyId} is not null and ${t.role} is not null)
        or (${t.purpose} = 'reset' and ${t.userId} is not null)`,
    ),
  ],
);

/** Access and change log. No foreign keys: the record outlives what it mentions. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
    userId: uuid('user_id'),
    studyId: uuid('study_id'),
    action: text('action').notNull(),
    target: text('target'),
    detail: jsonb('detail').$type<Record<string, unknown>>(),
  },
  (t) => [index('audit_log_study_idx').on(t.studyId, t.id)],
);

export type Role = (typeof ROLES)[number];
export type DocKind = (typeof DOC_KINDS)[number];
export type StudyMode = (typeof STUDY_MODES)[number];
export type RoundPhase = (typeof ROUND_PHASES)[number];
export type RoundRow = typeof rounds.$inferSelect;
export type UserRow = typeof users.$inferSelect;
export type StudyRow = typeof studies.$inferSelect;
export type TextRow = typeof texts.$inferSelect;
export type AccountLinkRow = typeof accountLinks.$inferSelect;
export type DocumentRow = typeof documents.$inferSelect;
