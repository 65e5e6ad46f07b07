/**
 * Relational projection of the Yjs documents (DESIGN §6): segments, codes, memos, cases, attributes.
 * These rows are derived: the server rewrites a document's rows from its current state shortly after
 * each change, so they may lag the documents by about a second and are never written by clients.
 * Ids of codes, segments, memos, cases and attributes are the model's string ids, not uuids.
 */
import { bigint, boolean, index, integer, jsonb, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { documents, studies, texts, users } from './schema.js';

const studyRef = () =>
  uuid('study_id')
    .notNull()
    .references(() => studies.id, { onDelete: 'cascade' });
const ms = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });

export const projectedSegments = pgTable(
  'segments',
  {
    layerDocId: uuid('layer_doc_id')
      .notNull()
      .references(() => documents.id, { onDelete: 'cascade' }),
    id: text('id').notNull(),
    studyId: studyRef(),
    textId: uuid('text_id')
      .notNull()
      .references(() => texts.id, { onDelete: 'cascade' }),
    coderId: uuid('coder_id').references(() => users.id, { onDelete: 'set null' }),
    codeId: text('code_id').notNull(),
    start: integer('start').notNull(),
    end: integer('end').notNull(),
    quote: text('quote').notNull(),
    orphaned: boolean('orphaned').notNull(),
    note: text('note'),
    createdAt: ms('created_at').notNull(),
    /** The speaker turn the segment starts in (index and label), for retrieval filters and unit tables. */
    turnIndex: integer('turn_index'),
    speaker: text('speaker'),
    /** The calibration round it was coded in, when the coder's client recorded one. */
    round: integer('round'),
  },
  (t) => [
    primaryKey({ columns: [t.layerDocId, t.id] }),
    index('segments_text_idx').on(t.textId),
    index('segments_study_code_idx').on(t.studyId, t.codeId),
  ],
);

export const projectedCodes = pgTable(
  'codes',
  {
    studyId: studyRef(),
    id: text('id').notNull(),
    label: text('label').notNull(),
    parentId: text('parent_id'),
    status: text('status').notNull(),
    type: text('type').notNull(),
    briefDefinition: text('brief_definition').notNull(),
    fullDefinition: text('full_definition').notNull(),
    inclusion: text('inclusion').notNull(),
    exclusion: text('exclusion').notNull(),
    colour: text('colour').notNull(),
    mergedInto: text('merged_into'),
    inVivo: boolean('in_vivo').notNull(),
    createdAt: ms('created_at').notNull(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.id] })],
);

export const projectedMemos = pgTable(
  'memos',
  {
    studyId: studyRef(),
    id: text('id').notNull(),
    author: text('author').notNull(),
    kind: text('kind').notNull(),
    /** study | text | segment | code */
    attachedKind: text('attached_kind').notNull(),
    /** the text id (text, segment) or code id (code); null for the study */
    attachedRef: text('attached_ref'),
    segmentId: text('segment_id'),
    title: text('title').notNull(),
    body: text('body').notNull(),
    createdAt: ms('created_at').notNull(),
    updatedAt: ms('updated_at').notNull(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.id] }), index('memos_attached_idx').on(t.studyId, t.attachedKind, t.attachedRef)],
);

export const projectedCases = pgTable(
  'cases',
  {
    studyId: studyRef(),
    id: text('id').notNull(),
    name: text('name').notNull(),
    kind: text('kind').notNull(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.id] })],
);

export const projectedAttributes = pgTable(
  'attributes',
  {
    studyId: studyRef(),
    id: text('id').notNull(),
    name: text('name').notNull(),
    type: text('type').notNull(),
    choices: jsonb('choices').$type<string[]>(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.id] })],
);

export const projectedCaseValues = pgTable(
  'case_values',
  {
    studyId: studyRef(),
    caseId: text('case_id').notNull(),
    attributeId: text('attribute_id').notNull(),
    value: jsonb('value').$type<string | number | boolean | null>(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.caseId, t.attributeId] })],
);

export const projectedCaseTexts = pgTable(
  'case_texts',
  {
    studyId: studyRef(),
    caseId: text('case_id').notNull(),
    textId: text('text_id').notNull(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.caseId, t.textId] }), index('case_texts_text_idx').on(t.textId)],
);

/**
 * How far each layer, codebook and memos document has been projected: the highest update-log sequence
 * number its rows reflect (0 for a document that is only its first snapshot) and, for a layer, the same
 * for its text's document (a correction moves the layer's offsets and quotes). Written in the
 * transaction that writes the rows, so the two never disagree; a node's start projects only documents
 * whose log has moved past it (projection/catch-up.ts).
 */
export const projectionState = pgTable('projection_state', {
  docId: uuid('doc_id')
    .primaryKey()
    .references(() => documents.id, { onDelete: 'cascade' }),
  seq: bigint('seq', { mode: 'number' }).notNull(),
  textSeq: bigint('text_seq', { mode: 'number' }),
  projectedAt: ms('projected_at').notNull().defaultNow(),
});

export type ProjectedSegmentRow = typeof projectedSegments.$inferInsert;
export type ProjectedCodeRow = typeof projectedCodes.$inferInsert;
export type ProjectedMemoRow = typeof projectedMemos.$inferInsert;
