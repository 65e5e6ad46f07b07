/**
 * REFI-QDA export: the codebook file (.qdc, spec §5.2) and the project file (.qdpx, spec §8: a ZIP of
 * `project.qde` and `sources/`). Positions are Unicode code points from 0 (spec §10.2) and Gloss writes
 * the end position EXCLUSIVE (end − start = the number of characters selected, as in the spec's
 * Annex A example). What the standard has no field for is packed into descriptions (packing.ts) or
 * lost; `exportLosses` says which, for the user to read before exporting.
 */
import { zipSync } from 'fflate';
import { OffsetMap } from '../exchange/code-points.js';
import { parentsFirst, type ExAttribute, type ExCode, type ExMemo, type StudyData, type StudyFrame } from '../exchange/study-data.js';
import { guidFor } from './guid.js';
import { packCode, packMeta } from './packing.js';
import { decimal, el, textEl } from './xml-write.js';

export const PROJECT_NS = 'urn:QDA-XML:project:1.0';
export const CODEBOOK_NS = 'urn:QDA-XML:codebook:1.0';
export const ORIGIN = 'Gloss';
/** Said to the user with every export and import. */
export const END_POSITION_NOTE =
  'Positions are Unicode code points from 0; Gloss writes the end position exclusive (end − start = the number of characters).';

export function exportLosses(format: 'qdc' | 'qdpx'): string[] {
  const common = [
    'Definitions, when to use, when not to use, examples, near-misses, code type and status have no field in the standard: they are packed into each code\'s description as labelled sections, which Gloss reads back but other programs show as plain text.',
    'The codebook\'s change history (who changed what, when, why, in which round) is not exported.',
    'Mutually exclusive sets and themes become sets; whether a set is mutually exclusive is only in its description.',
    END_POSITION_NOTE,
  ];
  if (format === 'qdc') return [...common, 'A codebook file carries codes and sets only: no texts, segments, memos or cases.'];
  return [
    ...common,
    'Calibration rounds, consensus and intercoder agreement are not exported; each segment is a selection with one coding by its coder.',
    'Speaker turns and timestamps have no place in a text source: they are packed into the source\'s description.',
    'Segments whose words were all deleted (orphaned) are left out: a selection needs words.',
    'Case kinds and the choices of a choice attribute are packed into descriptions; a choice attribute becomes a text variable.',
    'Jottings become notes marked as jottings in their description; segment notes become selection descriptions.',
    'Replies to memos and jottings are not exported (a note has no thread): the memos Markdown export lists them under their memo.',
    'Users are written with their name and email: the file is personal data.',
  ];
}

interface Ids {
  scope: string;
}
const g = (ids: Ids, kind: string, id: string) => guidFor(ids.scope, kind, id);

function codeDescription(c: ExCode): string {
  return packCode({
    briefDefinition: c.briefDefinition,
    fullDefinition: c.fullDefinition,
    inclusion: c.inclusion,
    exclusion: c.exclusion,
    examples: c.examples.map((e) => e.quote),
    nearMisses: c.nearMisses.map((e) => e.quote),
    meta: {
      type: c.type,
      status: c.status,
      'in vivo': c.inVivo ? 'yes' : 'no',
      ...(c.mergedInto ? { 'merged into': c.mergedInto } : {}),
      id: c.id,
    },
  });
}

function codesXml(ids: Ids, codes: readonly ExCode[], noteRefs: Map<string, string[]>): string {
  const ordered = parentsFirst(codes);
  const known = new Set(ordered.map((c) => c.id));
  const kids = new Map<string | null, ExCode[]>();
  for (const c of ordered) {
    const p = c.parentId !== null && known.has(c.parentId) ? c.parentId : null;
    kids.set(p, [...(kids.get(p) ?? []), c]);
  }
  const placed = new Set<string>();
  const one = (c: ExCode): string => {
    placed.add(c.id);
    const children = (kids.get(c.id) ?? []).filter((k) => !placed.has(k.id));
    return el(
      'Code',
      { guid: g(ids, 'code', c.id), name: c.label, isCodable: c.status === 'active' || c.status === 'draft', color: /^#[0-9a-fA-F]{6}$/.test(c.colour) ? c.colour : undefined },
      textEl('Description', codeDescription(c)),
      ...(noteRefs.get(c.id) ?? []).map((n) => el('NoteRef', { targetGUID: n })),
      ...children.map(one),
    );
  };
  const roots = (kids.get(null) ?? []).map(one);
  // codes in a parent cycle were never reached from a root: put them at the top
  const rest = ordered.filter((c) => !placed.has(c.id)).map(one);
  return el('Codes', {}, ...roots, ...rest);
}

/** The codebook file (.qdc) as XML text. */
export function codebookQdc(frame: Pick<StudyFrame, 'codes' | 'groups'>, scope: string): string {
  const ids = { scope };
  const sets = frame.groups.map((s) =>
    el(
      'Set',
      { guid: g(ids, 'set', s.id), name: s.label },
      textEl('Description', packMeta({ kind: s.kind === 'exclusive' ? 'mutually exclusive' : 'theme' })),
      ...s.codeIds.filter((c) => frame.codes.some((x) => x.id === c)).map((c) => el('MemberCode', { guid: g(ids, 'code', c) })),
    ),
  );
  return (
    '<?xml version="1.0" encoding="utf-8"?>\n' +
    el('CodeBook', { xmlns: CODEBOOK_NS, origin: ORIGIN }, frame.codes.length ? codesXml(ids, frame.codes, new Map()) : el('Codes', {}), sets.length ? el('Sets', {}, ...sets) : '') +
    '\n'
  );
}

const VARIABLE_TYPE: Record<ExAttribute['type'], string> = { text: 'Text', number: 'Float', date: 'Date', boolean: 'Boolean', choice: 'Text' };

function valueXml(a: ExAttribute, v: string | number | boolean): string | null {
  switch (a.type) {
    case 'number':
      return typeof v === 'number' && Number.isFinite(v) ? textEl('FloatValue', decimal(v)) : null;
    case 'boolean':
      return typeof v === 'boolean' ? textEl('BooleanValue', String(v)) : null;
    case 'date':
      return typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v) ? textEl('DateValue', v) : null;
    default:
      return textEl('TextValue', String(v));
  }
}

const iso = (ms: number) => new Date(Number.isFinite(ms) ? ms : 0).toISOString();

export interface ProjectFile {
  /** project.qde */
  xml: string;
  /** sources/<name> → UTF-8 text */
  sources: Map<string, string>;
  /** Segments left out (orphaned), for the report. */
  skipped: number;
}

/** The project as project.qde plus its source files. `scope` (the study id) seeds the GUIDs. */
export function projectFile(data: StudyData, scope: string): ProjectFile {
  const ids = { scope };
  const coderGuid = (id: string) => g(ids, 'user', id);
  const knownCoders = new Set(data.coders.map((c) => c.id));
  const memoGuid = (m: ExMemo) => g(ids, 'note', m.id);

  // where each memo's NoteRef goes
  const refsOn = { study: [] as string[], text: new Map<string, string[]>(), segment: new Map<string, string[]>(), code: new Map<string, string[]>() };
  const push = (m: Map<string, string[]>, k: string, v: string) => m.set(k, [...(m.get(k) ?? []), v]);
  for (const m of data.memos) {
    const a = m.attachedTo;
    if (a.kind === 'study') refsOn.study.push(memoGuid(m));
    else if (a.kind === 'text') push(refsOn.text, a.textId, memoGuid(m));
    else if (a.kind === 'segment') push(refsOn.segment, a.segmentId, memoGuid(m));
    else push(refsOn.code, a.codeId, memoGuid(m));
  }

  const users = data.coders.map((c) => el('User', { guid: coderGuid(c.id), name: c.name, id: c.email || undefined }));
  const codeIds = new Set(data.codes.map((c) => c.id));
  const variables = data.attributes.map((a) =>
    el(
      'Variable',
      { guid: g(ids, 'variable', a.id), name: a.name, typeOfVariable: VARIABLE_TYPE[a.type] },
      textEl('Description', packMeta({ type: a.type, ...(a.choices ? { choices: JSON.stringify(a.choices) } : {}) })),
    ),
  );
  const textIds = new Set(data.texts.map((t) => t.id));
  const cases = data.cases.map((c) =>
    el(
      'Case',
      { guid: g(ids, 'case', c.id), name: c.name },
      textEl('Description', packMeta({ kind: c.kind })),
      ...data.attributes.flatMap((a) => {
        const v = c.values[a.id];
        const x = v === null || v === undefined ? null : valueXml(a, v);
        return x ? [el('VariableValue', {}, el('VariableRef', { targetGUID: g(ids, 'variable', a.id) }), x)] : [];
      }),
      ...c.textIds.filter((t) => textIds.has(t)).map((t) => el('SourceRef', { targetGUID: g(ids, 'source', t) })),
    ),
  );

  const sources = new Map<string, string>();
  let skipped = 0;
  const bySegmentText = new Map<string, typeof data.segments>();
  for (const s of data.segments) bySegmentText.set(s.textId, [...(bySegmentText.get(s.textId) ?? []), s]);
  const sourceEls = data.texts.map((t) => {
    const guid = g(ids, 'source', t.id);
    const file = `${guid}.txt`;
    sources.set(file, t.content);
    const map = new OffsetMap(t.content);
    const turns = t.turns.map((u) => [map.toCodePoint(u.start), u.speaker, u.startMs, u.endMs]);
    const selections = (bySegmentText.get(t.id) ?? [])
      .filter((s) => {
        const keep = s.end > s.start && codeIds.has(s.codeId);
        if (!keep) skipped++;
        return keep;
      })
      .sort((a, b) => a.start - b.start || a.end - b.end || (a.id < b.id ? -1 : 1))
      .map((s) =>
        el(
          'PlainTextSelection',
          {
            guid: g(ids, 'selection', s.id),
            name: s.quote.length > 60 ? s.quote.slice(0, 59) + '…' : s.quote,
            startPosition: map.toCodePoint(s.start),
            endPosition: map.toCodePoint(s.end),
            creatingUser: knownCoders.has(s.coderId) ? coderGuid(s.coderId) : undefined,
            creationDateTime: iso(s.createdAt),
          },
          s.note ? textEl('Description', s.note) : '',
          el(
            'Coding',
            { guid: g(ids, 'coding', s.id), creatingUser: knownCoders.has(s.coderId) ? coderGuid(s.coderId) : undefined, creationDateTime: iso(s.createdAt) },
            el('CodeRef', { targetGUID: g(ids, 'code', s.codeId) }),
          ),
          ...(refsOn.segment.get(s.id) ?? []).map((n) => el('NoteRef', { targetGUID: n })),
        ),
      );
    return el(
      'TextSource',
      { guid, name: t.title, plainTextPath: `internal://${file}` },
      textEl('Description', packMeta({ turns: JSON.stringify(turns), id: t.id })),
      ...selections,
      ...(refsOn.text.get(t.id) ?? []).map((n) => el('NoteRef', { targetGUID: n })),
    );
  });

  const notes = data.memos.map((m) =>
    el(
      'Note',
      {
        guid: memoGuid(m),
        name: m.title || undefined,
        creatingUser: knownCoders.has(m.author) ? coderGuid(m.author) : undefined,
        creationDateTime: iso(m.createdAt),
        modifiedDateTime: iso(m.updatedAt),
      },
      textEl('Description', packMeta({ kind: m.kind, ...(knownCoders.has(m.author) ? {} : { author: m.author }) })),
      textEl('PlainTextContent', m.body),
    ),
  );
  const sets = data.groups.map((s) =>
    el(
      'Set',
      { guid: g(ids, 'set', s.id), name: s.label },
      textEl('Description', packMeta({ kind: s.kind === 'exclusive' ? 'mutually exclusive' : 'theme' })),
      ...s.codeIds.filter((c) => codeIds.has(c)).map((c) => el('MemberCode', { targetGUID: g(ids, 'code', c) })),
    ),
  );

  const xml =
    '<?xml version="1.0" encoding="utf-8"?>\n' +
    el(
      'Project',
      { xmlns: PROJECT_NS, name: data.title, origin: ORIGIN, creationDateTime: new Date().toISOString() },
      users.length ? el('Users', {}, ...users) : '',
      data.codes.length ? el('CodeBook', {}, codesXml(ids, data.codes, refsOn.code)) : '',
      variables.length ? el('Variables', {}, ...variables) : '',
      cases.length ? el('Cases', {}, ...cases) : '',
      sourceEls.length ? el('Sources', {}, ...sourceEls) : '',
      notes.length ? el('Notes', {}, ...notes) : '',
      sets.length ? el('Sets', {}, ...sets) : '',
      data.description ? textEl('Description', data.description) : '',
      ...refsOn.study.map((n) => el('NoteRef', { targetGUID: n })),
    ) +
    '\n';
  return { xml, sources, skipped };
}

/** The .qdpx archive. */
export function projectQdpx(file: ProjectFile): Uint8Array {
  const enc = new TextEncoder();
  const entries: Record<string, Uint8Array> = { 'project.qde': enc.encode(file.xml) };
  for (const [name, text] of file.sources) entries[`sources/${name}`] = enc.encode(text);
  return zipSync(entries, { level: 6 });
}
