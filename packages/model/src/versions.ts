import * as Y from 'yjs';
import { getText } from './text-doc.js';
import { listSegments } from './layer-doc.js';
import { resolveSegments, type ResolvedSegment } from './resolve.js';
import { DEFINITION_FIELDS, getCodes, type CodeView } from './codebook-doc.js';
import { diffWords, type WordChange } from './word-diff.js';
import { InvalidArgumentError, NotFoundError } from './errors.js';
import { newId, systemClock, type Clock } from './ids.js';

/**
 * Named versions. A version is a Yjs snapshot (state vector + delete set) of each document it covers,
 * which is small, so versions are kept in the study's codebook document (root `versions`) for every
 * member to see. Opening one rebuilds a detached, read-only copy with `Y.createDocFromSnapshot`; this
 * needs `gc: false`, which every Gloss document uses. Editing the copy changes nothing anywhere.
 */
export const VERSIONS_ROOT = 'versions';

export interface NamedVersion {
  id: string;
  name: string;
  at: number;
  by: string;
  /** document key (e.g. `text:<id>`, `layer:<id>`, `codebook`) -> encoded snapshot */
  snapshots: Record<string, Uint8Array>;
}

export function encodeSnapshotOf(doc: Y.Doc): Uint8Array {
  if (doc.gc) throw new InvalidArgumentError('versions need a document created with gc: false');
  return Y.encodeSnapshot(Y.snapshot(doc));
}

/** Snapshot the given documents under one name and record it in the codebook document. */
export function nameVersion(codebook: Y.Doc, docs: Record<string, Y.Doc>, name: string, who: { by: string; clock?: Clock }): NamedVersion {
  if (typeof name !== 'string' || name.trim() === '') throw new InvalidArgumentError('a version needs a name');
  const snapshots: Record<string, Uint8Array> = {};
  for (const [key, doc] of Object.entries(docs)) snapshots[key] = encodeSnapshotOf(doc);
  const v: NamedVersion = { id: newId('v'), name: name.trim(), at: (who.clock ?? systemClock)(), by: who.by, snapshots };
  codebook.getMap<NamedVersion>(VERSIONS_ROOT).set(v.id, v);
  return v;
}

export function listVersions(codebook: Y.Doc): NamedVersion[] {
  return [...codebook.getMap<NamedVersion>(VERSIONS_ROOT).values()].sort((a, b) => a.at - b.at);
}

export function getVersion(codebook: Y.Doc, id: string): NamedVersion {
  const v = codebook.getMap<NamedVersion>(VERSIONS_ROOT).get(id);
  if (v === undefined) throw new NotFoundError('version', id);
  return v;
}

/** A detached copy of `doc` as it stood at `snapshot`. */
export function openVersion(doc: Y.Doc, snapshot: Uint8Array): Y.Doc {
  return Y.createDocFromSnapshot(doc, Y.decodeSnapshot(snapshot), new Y.Doc({ gc: false }));
}

/** Segments of a layer as they stood, resolved against the text as it stood. */
export function segmentsAsTheyStood(textDoc: Y.Doc, textSnapshot: Uint8Array, layerDoc: Y.Doc, layerSnapshot: Uint8Array): ResolvedSegment[] {
  const oldText = openVersion(textDoc, textSnapshot);
  const oldLayer = openVersion(layerDoc, layerSnapshot);
  return resolveSegments(oldText, listSegments(oldLayer));
}

export interface TextComparison {
  changes: WordChange[];
  wordsAdded: number;
  wordsRemoved: number;
}

/** Words added and removed between a past version of a text and now. */
export function compareText(textDoc: Y.Doc, snapshot: Uint8Array): TextComparison {
  const before = getText(openVersion(textDoc, snapshot)).toString();
  const changes = diffWords(before, getText(textDoc).toString());
  let wordsAdded = 0;
  let wordsRemoved = 0;
  for (const c of changes) {
    if (c.kind === 'added') wordsAdded += c.words.length;
    else wordsRemoved += c.words.length;
  }
  return { changes, wordsAdded, wordsRemoved };
}

export interface CodebookComparison {
  added: CodeView[];
  removed: CodeView[];
  changed: Array<{ codeId: string; label: string; field: string; before: string; after: string }>;
}

/** Codes added, removed, and fields changed (definitions, label, status, parent, type) since a version. */
export function compareCodebook(codebook: Y.Doc, snapshot: Uint8Array): CodebookComparison {
  const old = new Map(getCodes(openVersion(codebook, snapshot)).map((c) => [c.id, c]));
  const now = new Map(getCodes(codebook).map((c) => [c.id, c]));
  const out: CodebookComparison = { added: [], removed: [], changed: [] };
  for (const [id, c] of now) if (!old.has(id)) out.added.push(c);
  for (const [id, c] of old) if (!now.has(id)) out.removed.push(c);
  const fields = ['label', ...DEFINITION_FIELDS, 'status', 'parentId', 'type', 'mergedInto'] as const;
  for (const [id, c] of now) {
    const o = old.get(id);
    if (o === undefined) continue;
    for (const f of fields) {
      const before = String(o[f] ?? '');
      const after = String(c[f] ?? '');
      if (before !== after) out.changed.push({ codeId: id, label: c.label, field: f, before, after });
    }
  }
  return out;
}
