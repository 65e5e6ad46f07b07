/**
 * A REFI-QDA import (plain data from @gloss/interchange) written into a study: a new one owned by the
 * importing account, or an existing one whose codebook and memos gain the imported entries. Everything
 * is built in memory first (Yjs documents through @gloss/model's operations), then written in ONE
 * database transaction — texts, documents, their first updates, new accounts and memberships, the
 * audit entry — so a failure leaves nothing behind.
 *
 * Coders are matched to accounts by email; a coder with no account gets one without a password (it
 * cannot sign in until an administrator sets one) and becomes a coder of the study. Codings by no
 * known user go to the importing account.
 */
import { randomUUID } from 'node:crypto';
import { type Db, documents, memberships, studies, texts, updates, users } from '@gloss/db';
import type { RefiImport } from '@gloss/interchange';
import {
  addCase,
  addCode,
  addExample,
  addExclusiveSet,
  addMemo,
  addSegment,
  addTheme,
  anchorRange,
  createCodebookDoc,
  createMemosDoc,
  createTextDoc,
  defineAttribute,
  isHexColour,
  listAttributes,
  newLayerDoc,
  setCaseValue,
  type AttributeValue,
  type MemoAttachment,
} from '@gloss/model';
import { and, eq, inArray } from 'drizzle-orm';
import * as Y from 'yjs';
import { recordAudit } from '../admin/audit.js';
import { wordCount } from '../admin/text-doc.js';
import { notFound } from '../errors.js';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';

export type ImportTarget = { studyId: string } | { newStudy: { title: string } };

export interface ImportReport {
  studyId: string;
  created: boolean;
  texts: number;
  codes: number;
  segments: number;
  memos: number;
  cases: number;
  coders: Array<{ name: string; email: string; account: 'existing' | 'created' | 'importer' }>;
  endReading: RefiImport['endReading'];
  warnings: string[];
  /** Documents written: the server notes them for projection. */
  documentIds: string[];
  /** The texts added. */
  textIds: string[];
  /**
   * Updates appended to documents that existed before (the codebook and memos of an existing study),
   * with their log position: the server hands them to open rooms so screens see them live.
   */
  appended: Array<{ docId: string; seq: number; update: Uint8Array }>;
}

const PLACEHOLDER_HASH = '!'; // never verifies: argon2 refuses it, so the account cannot sign in

export async function applyImport(db: Db, store: DocLoader, target: ImportTarget, data: RefiImport, actorId: string, format: 'qdc' | 'qdpx'): Promise<ImportReport> {
  const warnings = [...data.warnings];
  // one tick per entry so the codebook keeps the file's order (codes are listed by creation time)
  let tick = Date.now();
  const actor = { by: actorId, clock: () => tick++ };

  // --- existing study: its current codebook and memos, to add to ---
  let studyId: string;
  let cbDocId: string | null = null;
  let memosDocId: string | null = null;
  const cb = createCodebookDoc();
  const memos = createMemosDoc();
  if ('studyId' in target) {
    studyId = target.studyId;
    const docs = await db.select().from(documents).where(and(eq(documents.studyId, studyId), inArray(documents.kind, ['codebook', 'memos'])));
    if (!(await db.select({ id: studies.id }).from(studies).where(eq(studies.id, studyId))).length) throw notFound('Study');
    cbDocId = docs.find((d) => d.kind === 'codebook')?.id ?? null;
    memosDocId = docs.find((d) => d.kind === 'memos')?.id ?? null;
    if (cbDocId) Y.applyUpdate(cb, Y.encodeStateAsUpdate(await withLoaded(store, cbDocId)));
    if (memosDocId) Y.applyUpdate(memos, Y.encodeStateAsUpdate(await withLoaded(store, memosDocId)));
  } else {
    studyId = randomUUID();
  }
  const cbBefore = Y.encodeStateVector(cb);
  const memosBefore = Y.encodeStateVector(memos);

  // --- accounts for the file's users ---
  const emails = data.coders.map((c) => c.email).filter(Boolean);
  const known = emails.length ? await db.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, emails)) : [];
  const userOf = new Map<string, string>();
  const newUsers: Array<typeof users.$inferInsert> = [];
  const coderReport: ImportReport['coders'] = [];
  for (const c of data.coders) {
    const found = c.email ? known.find((k) => k.email === c.email) : undefined;
    if (found) {
      userOf.set(c.id, found.id);
      coderReport.push({ name: c.name, email: c.email, account: found.id === actorId ? 'importer' : 'existing' });
    } else if (data.segments.some((s) => s.coderId === c.id) || data.memos.some((m) => m.author === c.id)) {
      const id = randomUUID();
      // an address that cannot be anyone's (RFC 2606 reserves .invalid) when the file gives none
      const email = c.email || `imported-${c.id.slice(0, 8)}-${id.slice(0, 8)}@gloss.invalid`;
      newUsers.push({ id, email, name: c.name, passwordHash: PLACEHOLDER_HASH });
      userOf.set(c.id, id);
      coderReport.push({ name: c.name, email, account: 'created' });
    }
  }
  const who = (coderId: string) => userOf.get(coderId) ?? actorId;

  // --- codebook ---
  const codeOf = new Map<string, string>();
  const byGuid = new Map(data.codes.map((c) => [c.id, c]));
  const ordered: typeof data.codes = [];
  const visit = (c: (typeof data.codes)[number], trail: Set<string>) => {
    if (codeOf.has(c.id) || trail.has(c.id)) return;
    const parent = c.parentId ? byGuid.get(c.parentId) : undefined;
    if (parent) visit(parent, new Set(trail).add(c.id));
    if (codeOf.has(c.id)) return;
    const id = addCode(
      cb,
      {
        label: c.label,
        briefDefinition: c.briefDefinition,
        fullDefinition: c.fullDefinition,
        inclusion: c.inclusion,
        exclusion: c.exclusion,
        parentId: parent ? codeOf.get(parent.id) ?? null : null,
        ...(isHexColour(c.colour) ? { colour: c.colour } : {}),
        type: c.type,
        status: c.status,
        inVivo: c.inVivo,
      },
      { ...actor, reason: `imported from a REFI-QDA ${format} file` },
    );
    codeOf.set(c.id, id);
    ordered.push(c);
  };
  for (const c of data.codes) visit(c, new Set());
  for (const g of data.groups) {
    const ids = g.codeIds.map((c) => codeOf.get(c)).filter((x): x is string => Boolean(x));
    if (!ids.length) continue;
    if (g.kind === 'exclusive') addExclusiveSet(cb, g.label, ids, actor);
    else addTheme(cb, g.label, ids, actor);
  }

  // --- texts and their layers ---
  const textOf = new Map<string, string>();
  const textRows: Array<{ id: string; title: string; words: number; docId: string; update: Uint8Array }> = [];
  const layerRows: Array<{ docId: string; textId: string; coderId: string; update: Uint8Array }> = [];
  const segmentOf = new Map<string, string>();
  const textDocs = new Map<string, Y.Doc>();
  let segments = 0;
  try {
    for (const t of data.texts) {
      const id = randomUUID();
      textOf.set(t.id, id);
      const turns = t.turns.map((u, i) => {
        const end = i + 1 < t.turns.length ? t.turns[i + 1]!.start - 1 : t.content.length;
        return { speaker: u.speaker, startMs: u.startMs, endMs: u.endMs, text: t.content.slice(u.start, end) };
      });
      const doc = createTextDoc({ turns });
      if (doc.getText('text').toString() !== t.content) throw new Error(`text "${t.title}" did not rebuild to the same characters`);
      textDocs.set(t.id, doc);
      textRows.push({ id, title: t.title.slice(0, 300) || 'Untitled text', words: wordCount(t.content), docId: randomUUID(), update: Y.encodeStateAsUpdate(doc) });
      const byCoder = new Map<string, typeof data.segments>();
      for (const s of data.segments) if (s.textId === t.id) byCoder.set(who(s.coderId), [...(byCoder.get(who(s.coderId)) ?? []), s]);
      for (const [coderId, list] of byCoder) {
        const layer = newLayerDoc();
        for (const s of list) {
          if (s.end <= s.start) continue;
          const codeId = codeOf.get(s.codeId);
          if (!codeId) continue;
          const segId = addSegment(layer, doc, { codeId, start: s.start, end: s.end, ...(s.note ? { note: s.note } : {}) }, () => s.createdAt || Date.now());
          segmentOf.set(s.id, segId);
          segments++;
        }
        layerRows.push({ docId: randomUUID(), textId: id, coderId, update: Y.encodeStateAsUpdate(layer) });
        layer.destroy();
      }
    }

    // examples and near-misses: linked where their words are found in an imported text
    let unplaced = 0;
    for (const [guid, q] of data.exampleQuotes) {
      const codeId = codeOf.get(guid);
      if (!codeId) continue;
      for (const [kind, quotes] of [['example', q.examples], ['near-miss', q.nearMisses]] as const) {
        for (const quote of quotes) {
          const hit = data.texts.find((t) => t.content.includes(quote));
          if (!hit || !quote) {
            unplaced++;
            continue;
          }
          const at = hit.content.indexOf(quote);
          addExample(cb, codeId, { textId: textOf.get(hit.id)!, quote, ...anchorRange(textDocs.get(hit.id)!, at, at + quote.length) }, kind, actor);
        }
      }
    }
    if (unplaced) warnings.push(`${unplaced} example(s) or near-miss(es) were not found word for word in the imported texts; they stay in the codes' definitions as text only.`);
  } finally {
    for (const d of textDocs.values()) d.destroy();
  }

  // --- attributes and cases ---
  const attrOf = new Map<string, string>();
  const existingAttrs = listAttributes(cb);
  for (const a of data.attributes) {
    const same = existingAttrs.find((x) => x.name === a.name);
    attrOf.set(a.id, same ? same.id : defineAttribute(cb, { name: a.name, type: a.type, ...(a.choices ? { choices: a.choices } : {}) }));
  }
  let badValues = 0;
  for (const c of data.cases) {
    const caseId = addCase(cb, { name: c.name, kind: c.kind, textIds: c.textIds.map((t) => textOf.get(t)).filter((x): x is string => Boolean(x)) });
    for (const [a, v] of Object.entries(c.values)) {
      try {
        setCaseValue(cb, caseId, attrOf.get(a)!, v as AttributeValue);
      } catch {
        badValues++;
      }
    }
  }
  if (badValues) warnings.push(`${badValues} case value(s) did not fit their attribute's type and were left empty.`);

  // --- memos ---
  let memoCount = 0;
  for (const m of data.memos) {
    const a = m.attachedTo;
    let attachedTo: MemoAttachment = { kind: 'study' };
    if (a.kind === 'text' && textOf.has(a.textId)) attachedTo = { kind: 'text', textId: textOf.get(a.textId)! };
    else if (a.kind === 'segment' && textOf.has(a.textId)) {
      const seg = segmentOf.get(a.segmentId) ?? segmentOf.get(`${a.segmentId}#0`);
      attachedTo = seg ? { kind: 'segment', textId: textOf.get(a.textId)!, segmentId: seg } : { kind: 'text', textId: textOf.get(a.textId)! };
    } else if (a.kind === 'code' && codeOf.has(a.codeId)) attachedTo = { kind: 'code', codeId: codeOf.get(a.codeId)! };
    addMemo(memos, { kind: m.kind, author: who(m.author), title: m.title, body: m.body, attachedTo }, () => m.createdAt || Date.now());
    memoCount++;
  }

  const cbUpdate = Y.encodeStateAsUpdate(cb, cbBefore);
  const memosUpdate = Y.encodeStateAsUpdate(memos, memosBefore);
  cb.destroy();
  memos.destroy();

  // --- one transaction ---
  const documentIds: string[] = [];
  const appended: ImportReport['appended'] = [];
  const title = 'newStudy' in target ? target.newStudy.title : '';
  await db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    if ('newStudy' in target) {
      await t.insert(studies).values({ id: studyId, title, description: data.description, createdBy: actorId });
      await t.insert(memberships).values({ studyId, userId: actorId, role: 'owner' });
      const [c, m] = [randomUUID(), randomUUID()];
      await t.insert(documents).values([{ id: c, kind: 'codebook', studyId }, { id: m, kind: 'memos', studyId }]);
      cbDocId = c;
      memosDocId = m;
      await recordAudit(t, { userId: actorId, studyId, action: 'study.create', target: studyId, detail: { title, mode: 'standard', from: format } });
    }
    if (newUsers.length) await t.insert(users).values(newUsers);
    const coderIds = [...new Set(layerRows.map((l) => l.coderId).concat([...userOf.values()]))].filter((id) => id !== actorId);
    if (coderIds.length) await t.insert(memberships).values(coderIds.map((userId) => ({ studyId, userId, role: 'coder' as const }))).onConflictDoNothing();
    const base = Date.now();
    for (const [i, r] of textRows.entries()) {
      // one millisecond apart: texts are listed by when they were added, so they keep the file's order
      await t.insert(texts).values({ id: r.id, studyId, title: r.title, sourceFormat: format, wordCount: r.words, createdBy: actorId, createdAt: new Date(base + i) });
      await t.insert(documents).values({ id: r.docId, kind: 'text', studyId, textId: r.id });
      await t.insert(updates).values({ docId: r.docId, data: r.update, bytes: r.update.byteLength, userId: actorId });
    }
    for (const l of layerRows) {
      await t.insert(documents).values({ id: l.docId, kind: 'layer', studyId, textId: l.textId, coderId: l.coderId });
      await t.insert(updates).values({ docId: l.docId, data: l.update, bytes: l.update.byteLength, userId: l.coderId });
      documentIds.push(l.docId);
    }
    for (const [docId, update] of [[cbDocId, cbUpdate], [memosDocId, memosUpdate]] as const) {
      if (!docId || update.byteLength <= 2) continue;
      const [row] = await t.insert(updates).values({ docId, data: update, bytes: update.byteLength, userId: actorId }).returning({ seq: updates.seq });
      documentIds.push(docId);
      if (!('newStudy' in target)) appended.push({ docId, seq: Number(row!.seq), update });
    }
    await recordAudit(t, {
      userId: actorId,
      studyId,
      action: 'import',
      target: studyId,
      detail: { format, texts: textRows.length, codes: codeOf.size, segments, memos: memoCount, cases: data.cases.length, endReading: data.endReading, accountsCreated: newUsers.length },
    });
  });

  return {
    studyId,
    created: 'newStudy' in target,
    texts: textRows.length,
    codes: codeOf.size,
    segments,
    memos: memoCount,
    cases: data.cases.length,
    coders: coderReport,
    endReading: data.endReading,
    warnings,
    documentIds,
    textIds: textRows.map((r) => r.id),
    appended,
  };
}

async function withLoaded(store: DocLoader, docId: string): Promise<Y.Doc> {
  return loadDoc(store, docId);
}
