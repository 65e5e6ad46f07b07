/**
 * Which entries of a study's memos document a reader may receive (issue 9). The memos document is one
 * Yjs document for the whole study, so the rule is applied per entry: an entry attached to a text the
 * reader may not open (a trainee's unassigned text) is withheld, and so is a jotting on another coder's
 * segment when the reader may not read that coder's layer (the independent phase of a round, a trainee
 * without a shared comparison). Replies follow the memo they answer. The view is plain data carried in
 * the memos room's grant; `key` changes whenever the view does, so sync can tell a client its copy is stale.
 */
import { createHash } from 'node:crypto';
import * as Y from 'yjs';
import { type Db, documents, roundParticipants, roundTexts, rounds } from '@gloss/db';
import { and, eq, inArray } from 'drizzle-orm';
import { MEMOS_ROOT, type MemoAttachment } from '@gloss/model';
import type { Role } from '../sync/contracts.js';
import { can } from './policy.js';
import { studySupervision } from './supervision.js';

export interface MemoReaderView {
  /** The reader. */
  userId: string;
  /** Texts whose entries the reader may receive; null: every text. */
  texts: string[] | null;
  /** Whether the reader reads other people's layers at all (`layer.readOthers`). */
  othersLayers: boolean;
  /** Text id -> coders whose layer on it a supervisor shared with this reader (trainees). */
  sharedCoders: Record<string, string[]>;
  /** Text id -> participants of the independent round it is in now. */
  independent: Record<string, string[]>;
  /** Changes whenever anything above does (sha-256 of the rest, 16 hex digits). */
  key: string;
}

/** What the rule needs to know of one entry: its attachment, and whose segment a segment attachment names. */
export interface EntryFacts {
  attachedTo: MemoAttachment | undefined;
  /** The coder of the segment: a jotting is attached only to its author's own segment (CodingView), so the thread's first author. */
  coder: string | undefined;
}

export function viewKey(view: Omit<MemoReaderView, 'key'>): string {
  const sorted = (r: Record<string, string[]>) => Object.keys(r).sort().map((k) => [k, [...r[k]!].sort()]);
  const canonical = JSON.stringify([view.userId, view.texts && [...view.texts].sort(), view.othersLayers, sorted(view.sharedCoders), sorted(view.independent)]);
  return createHash('sha256').update(canonical).digest('hex').slice(0, 16);
}

/** True when the view withholds nothing (no need to look at entries at all). */
export function seesEverything(view: MemoReaderView): boolean {
  return view.texts === null && view.othersLayers && Object.keys(view.independent).length === 0;
}

export function mayReadEntry(view: MemoReaderView, entry: EntryFacts): boolean {
  const a = entry.attachedTo;
  if (a === undefined || a === null || typeof a !== 'object') return true; // study-wide (or unreadable): nothing text-bound
  if (a.kind !== 'text' && a.kind !== 'segment') return true;
  const textId = typeof a.textId === 'string' ? a.textId.toLowerCase() : '';
  if (view.texts !== null && !view.texts.includes(textId)) return false;
  if (a.kind === 'text') return true;
  const coder = entry.coder;
  if (coder === view.userId) return true;
  const participants = view.independent[textId];
  // during the independent phase a participant reads no one else's layer, and nobody reads a participant's round layer
  if (participants !== undefined && (participants.includes(view.userId) || (coder !== undefined && participants.includes(coder)))) return false;
  if (view.othersLayers) return true;
  return coder !== undefined && (view.sharedCoders[textId] ?? []).includes(coder);
}

/** The reader's view now, from the same facts the upgrade decides with (roles, supervision, rounds). */
export async function memoReaderView(db: Db, studyId: string, userId: string, role: Role): Promise<MemoReaderView> {
  const readsAll = can(role, 'text.readUnassigned');
  const othersLayers = can(role, 'layer.readOthers');
  const [supervision, independentRows] = await Promise.all([
    readsAll && othersLayers ? null : studySupervision(db, studyId, userId),
    // texts of the study's independent round(s) and their participants, in one query
    db
      .select({ textId: roundTexts.textId, userId: roundParticipants.userId })
      .from(rounds)
      .innerJoin(roundTexts, eq(roundTexts.roundId, rounds.id))
      .innerJoin(roundParticipants, eq(roundParticipants.roundId, rounds.id))
      .where(and(eq(rounds.studyId, studyId), eq(rounds.phase, 'independent'))),
  ]);
  const sharedCoders: Record<string, string[]> = {};
  if (!othersLayers && supervision && supervision.shared.size > 0) {
    const layers = await db.select({ textId: documents.textId, coderId: documents.coderId }).from(documents).where(inArray(documents.id, [...supervision.shared]));
    for (const l of layers) if (l.textId && l.coderId) (sharedCoders[l.textId] ??= []).push(l.coderId);
  }
  const independent: Record<string, string[]> = {};
  for (const r of independentRows) (independent[r.textId] ??= []).push(r.userId);
  const view = { userId, texts: readsAll ? null : [...(supervision?.assignedTexts ?? [])], othersLayers, sharedCoders, independent };
  return { ...view, key: viewKey(view) };
}

/** A field of a map entry as last written, deleted or not (a deleted memo's structs still travel: gc is off). */
function rawField(map: Y.Map<unknown>, field: string): unknown {
  const item = (map as unknown as { _map: Map<string, Y.Item> })._map.get(field);
  if (item === undefined) return undefined;
  const content = item.content.getContent();
  return content[content.length - 1];
}

/** The top-level entry item of `key` in the memos root, deleted or not. */
function entryMap(root: Y.Map<unknown>, key: string): Y.Map<unknown> | null {
  const item = (root as unknown as { _map: Map<string, Y.Item> })._map.get(key);
  const type = item?.content instanceof Y.ContentType ? item.content.type : null;
  return type instanceof Y.Map ? (type as Y.Map<unknown>) : null;
}

/** The facts of entry `key` of a memos document, following a reply to the memo it answers. */
export function entryFacts(doc: Y.Doc, key: string): EntryFacts {
  const root = doc.getMap<unknown>(MEMOS_ROOT);
  const entry = entryMap(root, key);
  if (entry === null) return { attachedTo: undefined, coder: undefined };
  const replyTo = rawField(entry, 'replyTo');
  const parent = typeof replyTo === 'string' && replyTo !== key ? entryMap(root, replyTo) : null;
  const first = parent ?? entry;
  const author = rawField(first, 'author');
  return { attachedTo: (rawField(first, 'attachedTo') ?? rawField(entry, 'attachedTo')) as MemoAttachment | undefined, coder: typeof author === 'string' ? author : undefined };
}
