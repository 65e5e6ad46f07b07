/**
 * Loads the invented demo study (demo/) into a database: accounts, the study and its members, the
 * codebook (entries, themes, the mutually exclusive set, examples anchored to the texts), cases and
 * attributes, starter memos, the four transcripts, and two coders' layers on two texts so that
 * agreement, flags and review have something to show on first open.
 *
 * Every document's first state goes in as its first log update, exactly as a text import does
 * (compaction folds it into a snapshot later).
 */
import { type Db, studies, updates } from '@gloss/db';
import { importTranscript } from '@gloss/interchange';
import * as M from '@gloss/model';
import { asc, eq } from 'drizzle-orm';
import * as Y from 'yjs';
import { loadDemo } from '../../../../demo/load.js';
import { addMember, addTextFromTranscript, createStudy, createUser, ensureLayer, findUserByEmail } from '../admin/index.js';
import type { Role } from '../sync/contracts.js';
import { assignText, setReference } from '../supervision/records.js';

interface DemoAccount { email: string; password: string; role: Role; name: string }
interface DemoCode {
  id: string; label: string; brief: string; full: string; inclusion: string; exclusion: string;
  examples: string[]; nearMisses: string[]; type: M.CodeType; parent: string | null; status: M.CodeStatus;
}
interface DemoGroups {
  themes: Array<{ id: string; label: string; codeIds: string[] }>;
  exclusiveSets: Array<{ id: string; label: string; codeIds: string[] }>;
}
interface DemoCases {
  attributes: Array<{ id: string; name: string; type: M.AttributeType; choices?: string[] }>;
  cases: Array<{ id: string; name: string; values: Record<string, M.AttributeValue> }>;
}
interface DemoMemo { title: string; body: string; attachTo: { kind: 'study' | 'text' | 'code'; ref: string } }
interface DemoStudy { title: string; description: string; mode: 'standard' | 'reflexive'; retentionUntil: string }
interface DemoIndexEntry { file: string; title: string; cases: string[] }

export interface SeedResult {
  seeded: boolean;
  studyId: string | null;
  accounts: Array<{ email: string; password: string; role: Role }>;
}

/** The texts that get two coders' layers at seed time (first and last interview). */
const LAYERED_TEXTS = new Set(['p01-beacon-projection.txt', 'p04-ferrowgate-chair.txt']);
/** The texts assigned to the demo's trainee; the first coder's layer is each one's reference. */
const TRAINEE_TEXTS = new Set(['p01-beacon-projection.txt', 'p04-ferrowgate-chair.txt']);

async function hasAnyStudy(db: Db): Promise<boolean> {
  const rows = await db.select({ id: studies.id }).from(studies).limit(1);
  return rows.length > 0;
}

async function putFirstState(db: Db, docId: string, doc: Y.Doc, userId: string): Promise<void> {
  const data = Y.encodeStateAsUpdate(doc);
  await db.insert(updates).values({ docId, data, bytes: data.byteLength, userId });
}

/** The text document as the import stored it (its log; nothing has been compacted yet). */
async function loadTextDoc(db: Db, docId: string): Promise<Y.Doc> {
  const rows = await db.select({ data: updates.data }).from(updates).where(eq(updates.docId, docId)).orderBy(asc(updates.seq));
  const doc = M.newTextDoc();
  for (const row of rows) Y.applyUpdate(doc, row.data);
  return doc;
}

/** Seeds the demo unless the database already holds a study. Idempotent in that sense. */
export async function seedDemo(db: Db, opts: { force?: boolean; dir?: string } = {}): Promise<SeedResult> {
  const bundle = loadDemo(opts.dir);
  const accounts = bundle.accounts as DemoAccount[];
  const listed = accounts.map(({ email, password, role }) => ({ email, password, role }));
  if (!opts.force && (await hasAnyStudy(db))) return { seeded: false, studyId: null, accounts: listed };

  const study = bundle.study as DemoStudy;
  const codes = bundle.codebook as DemoCode[];
  const groups = bundle.groups as DemoGroups;
  const cases = bundle.cases as DemoCases;
  const memos = bundle.memos as DemoMemo[];
  const index = bundle.index as DemoIndexEntry[];

  // Accounts (an existing account with the same email is reused), keyed by email.
  const userIds = new Map<string, string>();
  for (const a of accounts) {
    const user = (await findUserByEmail(db, a.email)) ?? (await createUser(db, { email: a.email, name: a.name, password: a.password }));
    userIds.set(a.email, user.id);
  }
  const idOf = (role: Role) => userIds.get(accounts.find((a) => a.role === role)!.email)!;
  const ownerId = idOf('owner');
  const created = await createStudy(db, {
    title: study.title,
    description: study.description,
    mode: study.mode,
    retentionUntil: new Date(study.retentionUntil + 'T00:00:00Z'),
    createdBy: ownerId,
  });
  for (const a of accounts) if (a.role !== 'owner') await addMember(db, created.id, userIds.get(a.email)!, a.role, ownerId);
  const coders = accounts.filter((a) => a.role === 'coder').map((a) => userIds.get(a.email)!);

  // Texts.
  const textIds = new Map<string, string>();
  const textDocs = new Map<string, Y.Doc>();
  for (const entry of index) {
    const content = bundle.texts[entry.file];
    if (content === undefined) throw new Error(`demo: texts/${entry.file} is listed in texts/index.json but missing`);
    const transcript = await importTranscript({ filename: entry.file, bytes: new TextEncoder().encode(content) });
    const row = await addTextFromTranscript(db, created.id, {
      title: entry.title,
      transcript: { ...transcript, title: entry.title },
      sourceFormat: 'txt',
      createdBy: ownerId,
    });
    textIds.set(entry.file, row.id);
    textDocs.set(entry.file, await loadTextDoc(db, row.room));
  }

  // Codebook: entries, then examples anchored where their words stand in the texts.
  const lead = { by: idOf('lead'), reason: 'Starter codebook of the demo study' };
  const cb = M.createCodebookDoc();
  const ordered = [...codes.filter((c) => !c.parent), ...codes.filter((c) => c.parent)];
  for (const c of ordered) {
    M.addCode(cb, {
      id: c.id, label: c.label, briefDefinition: c.brief, fullDefinition: c.full, inclusion: c.inclusion,
      exclusion: c.exclusion, parentId: c.parent, type: c.type, status: c.status,
    }, lead);
  }
  const findQuote = (quote: string) => {
    for (const [file, doc] of textDocs) {
      const at = M.readText(doc).indexOf(quote);
      if (at >= 0) return { file, doc, start: at, end: at + quote.length };
    }
    return null;
  };
  for (const c of codes) {
    for (const [kind, quotes] of [['example', c.examples], ['near-miss', c.nearMisses]] as const) {
      for (const quote of quotes) {
        const hit = findQuote(quote);
        if (!hit) continue;
        const anchors = M.anchorRange(hit.doc, hit.start, hit.end);
        M.addExample(cb, c.id, { textId: textIds.get(hit.file)!, quote, start: anchors.start, end: anchors.end }, kind, lead);
      }
    }
  }
  for (const t of groups.themes) M.addTheme(cb, t.label, t.codeIds, lead);
  for (const s of groups.exclusiveSets) M.addExclusiveSet(cb, s.label, s.codeIds, lead);

  // Cases and attributes (kept in the codebook document, under their own roots).
  const attrIds = new Map<string, string>();
  for (const a of cases.attributes) {
    attrIds.set(a.id, M.defineAttribute(cb, { name: a.name, type: a.type, ...(a.choices ? { choices: a.choices } : {}) }));
  }
  const caseIds = new Map<string, string>();
  for (const k of cases.cases) {
    const id = M.addCase(cb, { name: k.name, kind: String(k.values['a-kind'] ?? 'participant') });
    caseIds.set(k.id, id);
    for (const [attr, value] of Object.entries(k.values)) M.setCaseValue(cb, id, attrIds.get(attr)!, value);
  }
  for (const entry of index) {
    for (const c of entry.cases) if (caseIds.has(c)) M.linkText(cb, caseIds.get(c)!, textIds.get(entry.file)!);
  }
  await putFirstState(db, created.codebookRoom, cb, lead.by);

  // Memos.
  const memoDoc = M.createMemosDoc();
  for (const m of memos) {
    const attachedTo: M.MemoAttachment =
      m.attachTo.kind === 'text' ? { kind: 'text', textId: textIds.get(m.attachTo.ref)! }
      : m.attachTo.kind === 'code' ? { kind: 'code', codeId: m.attachTo.ref }
      : { kind: 'study' };
    M.addMemo(memoDoc, { kind: 'memo', author: lead.by, title: m.title, body: m.body, attachedTo });
  }
  await putFirstState(db, created.memosRoom, memoDoc, lead.by);

  const references = new Map<string, string>();
  // Two coders' layers on two texts: both code the examples; the second coder also applies codes to
  // their near-misses, so the demo shows disagreement and (on P04) the exclusive-set flag.
  for (const [file, doc] of textDocs) {
    if (!LAYERED_TEXTS.has(file)) continue;
    const text = M.readText(doc);
    for (const [i, coderId] of coders.entries()) {
      const layer = M.newLayerDoc();
      for (const c of codes) {
        const quotes = i === 0 ? c.examples : [...c.examples, ...c.nearMisses];
        for (const quote of quotes) {
          const at = text.indexOf(quote);
          if (at < 0) continue;
          M.addSegment(layer, doc, { codeId: c.id, start: at, end: at + quote.length });
        }
      }
      const layerId = await ensureLayer(db, created.id, textIds.get(file)!, coderId);
      await putFirstState(db, layerId, layer, coderId);
      if (TRAINEE_TEXTS.has(file) && i === 0) references.set(file, layerId);
    }
  }
  // Supervision: the trainee practises on two interviews, each compared with the first coder's layer.
  const trainee = accounts.find((a) => a.role === 'trainee');
  for (const file of TRAINEE_TEXTS) {
    const practice = textIds.get(file);
    if (!trainee || !practice) continue;
    await assignText(db, { studyId: created.id, textId: practice, userId: userIds.get(trainee.email)!, assignedBy: lead.by });
    const reference = references.get(file);
    if (reference) await setReference(db, practice, reference, lead.by);
  }
  return { seeded: true, studyId: created.id, accounts: listed };
}
