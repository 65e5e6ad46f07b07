/**
 * REFI-QDA import: a codebook file (.qdc) or a project file (.qdpx) into plain study data
 * (exchange/study-data.ts), all or nothing: anything malformed throws an ExchangeError naming it.
 * What Gloss cannot take (pictures, PDFs, audio and video sources, links, graphs) is left out and
 * said in `warnings`. Positions are Unicode code points; the end position is read exclusive or
 * inclusive (NOTES: the spec's text and its Annex example disagree) — see `chooseEndReading`.
 */
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { OffsetMap } from '../exchange/code-points.js';
import type { ExAttribute, ExAttributeType, ExCase, ExCode, ExCodeStatus, ExCodeType, ExCoder, ExGroup, ExMemo, ExSegment, ExText, ExTurn, ExValue, StudyData } from '../exchange/study-data.js';
import { ExchangeError } from './errors.js';
import { CODEBOOK_NS, ORIGIN, PROJECT_NS } from './export.js';
import { normaliseGuid } from './guid.js';
import { unpackCode, unpackMeta } from './packing.js';
import { DEFAULT_ZIP_LIMITS, readZip, type ZipLimits } from './zip-read.js';

export type EndReading = 'exclusive' | 'inclusive';

export interface RefiImportOptions {
  /** How to read endPosition; 'auto' (default) decides per file (chooseEndReading). */
  endPosition?: EndReading | 'auto';
  limits?: Partial<ZipLimits>;
  onProgress?: (fraction: number) => void;
}

export interface RefiImport extends StudyData {
  /** Example quotes of each code, to be linked to texts where the words are found. */
  exampleQuotes: Map<string, { examples: string[]; nearMisses: string[] }>;
  endReading: EndReading;
  warnings: string[];
  origin: string | null;
}

type Node = Record<string, unknown>;

const LISTS = new Set([
  'User', 'Code', 'Set', 'MemberCode', 'MemberSource', 'MemberNote', 'Variable', 'Case', 'VariableValue', 'SourceRef', 'SelectionRef', 'CodeRef',
  'TextSource', 'PictureSource', 'PDFSource', 'AudioSource', 'VideoSource', 'PlainTextSelection', 'Coding', 'NoteRef', 'Note', 'Link', 'Graph',
]);

function parseXml(xml: string, what: string): Node {
  // XML 1.0 §2.11: a literal CR (alone or before LF) reads as LF; escaped &#13; survives.
  const text = xml.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
  if (/<!DOCTYPE/i.test(text)) throw new ExchangeError('bad_xml', `${what}: a DOCTYPE is not accepted (entity declarations can expand without bound)`);
  const ok = XMLValidator.validate(text);
  if (ok !== true) throw new ExchangeError('bad_xml', `${what}: line ${ok.err.line}, column ${ok.err.col}: ${ok.err.msg}`);
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: '@',
    removeNSPrefix: true,
    parseTagValue: false,
    parseAttributeValue: false,
    trimValues: false,
    processEntities: true,
    htmlEntities: true,
    isArray: (name) => LISTS.has(name),
  });
  return parser.parse(text) as Node;
}

const kids = (n: unknown, name: string): Node[] => (n && typeof n === 'object' ? ((n as Node)[name] as Node[] | undefined) ?? [] : []);
const child = (n: unknown, name: string): Node | undefined => {
  let v = n && typeof n === 'object' ? (n as Node)[name] : undefined;
  if (Array.isArray(v)) v = v[0];
  return v && typeof v === 'object' ? (v as Node) : undefined;
};
const attr = (n: Node, name: string): string | undefined => (typeof n[`@${name}`] === 'string' ? (n[`@${name}`] as string) : undefined);
/** An element's text: a string, or `#text` beside attributes; '' when empty. */
function textOf(n: unknown, name: string): string | undefined {
  if (!n || typeof n !== 'object') return undefined;
  const v = (n as Node)[name];
  if (v === undefined) return undefined;
  if (typeof v === 'string') return v;
  if (Array.isArray(v)) return textOf({ [name]: v[0] }, name);
  if (v && typeof v === 'object') return typeof (v as Node)['#text'] === 'string' ? ((v as Node)['#text'] as string) : '';
  return String(v);
}

function guidOf(n: Node, name: string, where: string): string {
  const raw = attr(n, name);
  const g = normaliseGuid(raw);
  if (!g) throw new ExchangeError('bad_reference', `${where}: ${name} "${raw ?? ''}" is not a GUID`);
  return g;
}

const CODE_TYPES: ExCodeType[] = ['theory-driven', 'data-driven', 'structural'];
const CODE_STATUSES: ExCodeStatus[] = ['draft', 'active', 'merged', 'retired'];
const COLOUR6 = /^#[0-9a-fA-F]{6}$/;
const COLOUR3 = /^#([0-9a-fA-F])([0-9a-fA-F])([0-9a-fA-F])$/;

function colourOf(raw: string | undefined): string | null {
  if (!raw) return null;
  if (COLOUR6.test(raw)) return raw.toLowerCase();
  const m = COLOUR3.exec(raw);
  return m ? `#${m[1]}${m[1]}${m[2]}${m[2]}${m[3]}${m[3]}`.toLowerCase() : null;
}

interface CodebookPart {
  codes: ExCode[];
  groups: ExGroup[];
  exampleQuotes: RefiImport['exampleQuotes'];
}

function readCodes(codesNode: Node | undefined, fromGloss: boolean): CodebookPart {
  const codes: ExCode[] = [];
  const exampleQuotes: RefiImport['exampleQuotes'] = new Map();
  const seen = new Set<string>();
  const walk = (list: Node[], parentId: string | null) => {
    for (const n of list) {
      const id = guidOf(n, 'guid', 'Code');
      if (seen.has(id)) throw new ExchangeError('bad_reference', `Code "${attr(n, 'name') ?? id}": GUID ${id} is used twice`);
      seen.add(id);
      const name = (attr(n, 'name') ?? '').trim();
      if (!name) throw new ExchangeError('not_refi', `Code ${id} has no name`);
      const u = unpackCode(textOf(n, 'Description') ?? '');
      const type = CODE_TYPES.includes(u.meta.type as ExCodeType) ? (u.meta.type as ExCodeType) : 'data-driven';
      const status = CODE_STATUSES.includes(u.meta.status as ExCodeStatus) ? (u.meta.status as ExCodeStatus) : 'active';
      codes.push({
        id,
        label: name,
        parentId,
        colour: colourOf(attr(n, 'color')) ?? '',
        type,
        status: status === 'merged' ? 'retired' : status, // the code it merged into is not carried: keep it out of use
        briefDefinition: u.briefDefinition,
        fullDefinition: u.fullDefinition,
        inclusion: u.inclusion,
        exclusion: u.exclusion,
        examples: [],
        nearMisses: [],
        mergedInto: null,
        inVivo: fromGloss && u.meta['in vivo'] === 'yes',
        createdAt: 0,
        history: [],
      });
      if (u.examples.length || u.nearMisses.length) exampleQuotes.set(id, { examples: u.examples, nearMisses: u.nearMisses });
      walk(kids(n, 'Code'), id);
    }
  };
  walk(kids(codesNode, 'Code'), null);
  return { codes, groups: [], exampleQuotes };
}

function readSets(setsNode: Node | undefined, codeIds: Set<string>, sourceIds: Set<string>, warnings: string[]): ExGroup[] {
  const out: ExGroup[] = [];
  let sourceSets = 0;
  for (const s of kids(setsNode, 'Set')) {
    const id = guidOf(s, 'guid', 'Set');
    const { meta } = unpackMeta(textOf(s, 'Description'));
    const members = kids(s, 'MemberCode').map((m) => normaliseGuid(attr(m, 'targetGUID') ?? attr(m, 'guid')));
    for (const m of members) if (!m || !codeIds.has(m)) throw new ExchangeError('bad_reference', `Set "${attr(s, 'name') ?? id}" names a code that is not in the file (${m ?? 'no GUID'})`);
    if (kids(s, 'MemberSource').some((m) => sourceIds.has(normaliseGuid(attr(m, 'targetGUID')) ?? '')) || kids(s, 'MemberNote').length) sourceSets++;
    if (members.length === 0) continue;
    out.push({ id, label: (attr(s, 'name') ?? '').trim() || 'Set', kind: meta.kind === 'mutually exclusive' ? 'exclusive' : 'theme', codeIds: members as string[] });
  }
  if (sourceSets) warnings.push(`${sourceSets} set(s) of texts or notes: Gloss groups codes only, so their text and note members were left out.`);
  return out;
}

/** A codebook file (.qdc). */
export function importQdc(xml: string): RefiImport {
  const root = parseXml(xml, 'codebook file');
  const cb = child(root, 'CodeBook');
  if (!cb) throw new ExchangeError('not_refi', 'this is not a REFI-QDA codebook: its root element is not CodeBook');
  const ns = attr(cb, 'xmlns');
  const warnings: string[] = [];
  if (ns !== undefined && ns !== CODEBOOK_NS) warnings.push(`The codebook names the namespace "${ns}", not ${CODEBOOK_NS}; it was read all the same.`);
  const origin = attr(cb, 'origin') ?? null;
  const part = readCodes(child(cb, 'Codes'), origin === ORIGIN);
  const groups = readSets(child(cb, 'Sets'), new Set(part.codes.map((c) => c.id)), new Set(), warnings);
  return { title: '', description: '', coders: [], codes: part.codes, groups, attributes: [], cases: [], memos: [], texts: [], segments: [], exampleQuotes: part.exampleQuotes, endReading: 'exclusive', warnings, origin };
}

interface RawSelection {
  guid: string;
  start: number;
  end: number;
  textId: string;
  codings: Array<{ guid: string; codeId: string; coder: string | null; at: number }>;
  note: string;
}

/** NOTES: "first and last character" in the text vs end − start = length in the Annex example. */
export function chooseEndReading(origin: string | null, selections: ReadonlyArray<{ start: number; end: number; length: number }>): EndReading {
  if (origin === ORIGIN) return 'exclusive';
  if (selections.some((s) => s.end === s.length && s.end > s.start)) return 'exclusive'; // an inclusive end cannot name the position after the last character
  if (selections.some((s) => s.start === s.end)) return 'inclusive'; // an exclusive end would select nothing
  return 'exclusive'; // the Annex A example's reading
}

const VARIABLE_TYPES: Record<string, ExAttributeType> = { Text: 'text', Boolean: 'boolean', Integer: 'number', Float: 'number', Date: 'date', DateTime: 'text' };

function readValue(vv: Node): ExValue | undefined {
  const t = textOf(vv, 'TextValue');
  if (t !== undefined) return t;
  const b = textOf(vv, 'BooleanValue');
  if (b !== undefined) return b.trim() === 'true' || b.trim() === '1';
  for (const k of ['IntegerValue', 'FloatValue']) {
    const n = textOf(vv, k);
    if (n !== undefined && Number.isFinite(Number(n.trim()))) return Number(n.trim());
  }
  const d = textOf(vv, 'DateValue');
  if (d !== undefined) return d.trim().slice(0, 10);
  const dt = textOf(vv, 'DateTimeValue');
  if (dt !== undefined) return dt.trim();
  return undefined;
}

const ms = (s: string | undefined) => {
  const t = s ? Date.parse(s) : NaN;
  return Number.isFinite(t) ? t : 0;
};

/** A project file (.qdpx). */
export function importQdpx(bytes: Uint8Array, opts: RefiImportOptions = {}): RefiImport {
  const limits = { ...DEFAULT_ZIP_LIMITS, ...opts.limits };
  const files = readZip(bytes, (n) => n === 'project.qde' || n.startsWith('sources/'), limits);
  const qde = files.get('project.qde');
  if (!qde) throw new ExchangeError('no_project', 'the archive has no project.qde (a .qdpx file must)');
  opts.onProgress?.(0.1);
  const decode = (b: Uint8Array, what: string) => {
    try {
      return new TextDecoder('utf-8', { fatal: true }).decode(b);
    } catch {
      throw new ExchangeError('bad_encoding', `${what} is not UTF-8 text`);
    }
  };
  const root = parseXml(decode(qde, 'project.qde'), 'project.qde');
  const p = child(root, 'Project');
  if (!p) throw new ExchangeError('not_refi', 'project.qde is not a REFI-QDA project: its root element is not Project');
  const warnings: string[] = [];
  const ns = attr(p, 'xmlns');
  if (ns !== undefined && ns !== PROJECT_NS) warnings.push(`The project names the namespace "${ns}", not ${PROJECT_NS}; it was read all the same.`);
  const origin = attr(p, 'origin') ?? null;

  const coders: ExCoder[] = kids(child(p, 'Users'), 'User').map((u) => ({
    id: guidOf(u, 'guid', 'User'),
    name: (attr(u, 'name') ?? '').trim() || (attr(u, 'id') ?? '').trim() || 'Unnamed coder',
    email: /^[^\s@]+@[^\s@]+$/.test((attr(u, 'id') ?? '').trim()) ? attr(u, 'id')!.trim().toLowerCase() : '',
  }));
  const coderIds = new Set(coders.map((c) => c.id));
  const part = readCodes(child(child(p, 'CodeBook'), 'Codes'), origin === ORIGIN);
  const codeIds = new Set(part.codes.map((c) => c.id));

  // notes first: codes, sources and selections point at them
  const memos: ExMemo[] = [];
  const noteById = new Map<string, ExMemo>();
  for (const n of kids(child(p, 'Notes'), 'Note')) {
    const id = guidOf(n, 'guid', 'Note');
    const { meta } = unpackMeta(textOf(n, 'Description'));
    const creator = normaliseGuid(attr(n, 'creatingUser'));
    let body = textOf(n, 'PlainTextContent');
    if (body === undefined && attr(n, 'plainTextPath')) body = sourceText(files, attr(n, 'plainTextPath')!, `Note "${attr(n, 'name') ?? id}"`, decode);
    const m: ExMemo = {
      id,
      kind: meta.kind === 'jotting' ? 'jotting' : 'memo',
      author: creator && coderIds.has(creator) ? creator : meta.author ?? '',
      title: (attr(n, 'name') ?? '').trim(),
      body: body ?? '',
      attachedTo: { kind: 'study' },
      createdAt: ms(attr(n, 'creationDateTime')),
      updatedAt: ms(attr(n, 'modifiedDateTime') ?? attr(n, 'creationDateTime')),
    };
    memos.push(m);
    noteById.set(id, m);
  }
  const attach = (refs: Node[], to: ExMemo['attachedTo']) => {
    for (const r of refs) {
      const m = noteById.get(normaliseGuid(attr(r, 'targetGUID')) ?? '');
      if (m && m.attachedTo.kind === 'study') m.attachedTo = to; // a note referenced twice stays with its first place
    }
  };
  const walkCodeNotes = (list: Node[]) => {
    for (const n of list) {
      attach(kids(n, 'NoteRef'), { kind: 'code', codeId: guidOf(n, 'guid', 'Code') });
      walkCodeNotes(kids(n, 'Code'));
    }
  };
  walkCodeNotes(kids(child(child(p, 'CodeBook'), 'Codes'), 'Code'));

  const sourcesNode = child(p, 'Sources');
  const texts: ExText[] = [];
  const raw: RawSelection[] = [];
  const lengths = new Map<string, OffsetMap>();
  const other = ['PictureSource', 'PDFSource', 'AudioSource', 'VideoSource'].reduce((n, k) => n + kids(sourcesNode, k).length, 0);
  if (other) warnings.push(`${other} picture, PDF, audio or video source(s) were left out: Gloss codes texts only.`);
  const textSources = kids(sourcesNode, 'TextSource');
  textSources.forEach((s, i) => {
    const id = guidOf(s, 'guid', 'TextSource');
    const name = (attr(s, 'name') ?? '').trim() || `Text ${i + 1}`;
    const inline = textOf(s, 'PlainTextContent');
    const path = attr(s, 'plainTextPath');
    if (inline !== undefined && path) warnings.push(`Text "${name}" has both PlainTextContent and plainTextPath; the inline content was used.`);
    if (inline === undefined && !path) throw new ExchangeError('missing_source', `Text "${name}" has neither PlainTextContent nor plainTextPath`);
    const content = inline ?? sourceText(files, path!, `Text "${name}"`, decode);
    const map = new OffsetMap(content);
    lengths.set(id, map);
    const { meta } = unpackMeta(textOf(s, 'Description'));
    texts.push({ id, title: name, content, turns: turnsOf(meta.turns, content, map) });
    attach(kids(s, 'NoteRef'), { kind: 'text', textId: id });
    const codingOf = (c: Node, where: string) => {
      const codeRef = child(c, 'CodeRef');
      const codeId = codeRef ? normaliseGuid(attr(codeRef, 'targetGUID')) : null;
      if (!codeId || !codeIds.has(codeId)) throw new ExchangeError('bad_reference', `${where}: a coding names a code that is not in the codebook (${codeId ?? 'no GUID'})`);
      const coder = normaliseGuid(attr(c, 'creatingUser'));
      return { guid: guidOf(c, 'guid', where), codeId, coder: coder && coderIds.has(coder) ? coder : null, at: ms(attr(c, 'creationDateTime')) };
    };
    for (const sel of kids(s, 'PlainTextSelection')) {
      const guid = guidOf(sel, 'guid', `a selection in "${name}"`);
      const start = Number(attr(sel, 'startPosition'));
      const end = Number(attr(sel, 'endPosition'));
      if (!Number.isInteger(start) || !Number.isInteger(end)) throw new ExchangeError('bad_position', `selection ${guid} in "${name}": positions must be whole numbers`);
      const where = `selection ${guid} in "${name}"`;
      raw.push({ guid, start, end, textId: id, codings: kids(sel, 'Coding').map((c) => codingOf(c, where)), note: textOf(sel, 'Description') ?? '' });
      attach(kids(sel, 'NoteRef'), { kind: 'segment', textId: id, segmentId: guid });
    }
    // codings of the whole source: a segment over the whole text
    const whole = kids(s, 'Coding').map((c) => codingOf(c, `Text "${name}"`));
    if (whole.length) raw.push({ guid: `${id}-whole`, start: 0, end: map.codePointLength, textId: id, codings: whole, note: '' });
    opts.onProgress?.(0.1 + (0.6 * (i + 1)) / textSources.length);
  });

  const endReading =
    opts.endPosition && opts.endPosition !== 'auto'
      ? opts.endPosition
      : chooseEndReading(origin, raw.filter((r) => !r.guid.endsWith('-whole')).map((r) => ({ start: r.start, end: r.end, length: lengths.get(r.textId)!.codePointLength })));
  const segments: ExSegment[] = [];
  let unknownCoder = 0;
  for (const r of raw) {
    const map = lengths.get(r.textId)!;
    const endCp = r.guid.endsWith('-whole') || endReading === 'exclusive' ? r.end : r.end + 1;
    if (r.start < 0 || endCp < r.start || endCp > map.codePointLength) {
      throw new ExchangeError('bad_position', `selection ${r.guid}: positions ${r.start}–${r.end} fall outside its text of ${map.codePointLength} characters (end read ${endReading})`);
    }
    const start = map.toUtf16(r.start);
    const end = map.toUtf16(endCp);
    const content = texts.find((t) => t.id === r.textId)!.content;
    r.codings.forEach((c, k) => {
      if (c.coder === null) unknownCoder++;
      segments.push({
        id: r.codings.length === 1 ? r.guid : `${r.guid}#${k}`,
        textId: r.textId,
        coderId: c.coder ?? '',
        codeId: c.codeId,
        start,
        end,
        quote: content.slice(start, end),
        createdAt: c.at,
        ...(r.note ? { note: r.note } : {}),
      });
    });
  }
  if (unknownCoder) warnings.push(`${unknownCoder} coding(s) name no known user: they are given to the person importing.`);
  if (kids(child(p, 'Links'), 'Link').length) warnings.push('Links between items were left out: Gloss has no links.');
  if (kids(child(p, 'Graphs'), 'Graph').length) warnings.push('Graphs were left out: Gloss has no graphs.');

  // variables and cases
  const attributes: ExAttribute[] = kids(child(p, 'Variables'), 'Variable').map((v) => {
    const { meta } = unpackMeta(textOf(v, 'Description'));
    const declared = VARIABLE_TYPES[attr(v, 'typeOfVariable') ?? 'Text'] ?? 'text';
    let choices: string[] | undefined;
    try {
      const parsed: unknown = meta.choices ? JSON.parse(meta.choices) : undefined;
      if (Array.isArray(parsed) && parsed.length && parsed.every((x) => typeof x === 'string')) choices = parsed;
    } catch {
      choices = undefined;
    }
    const type: ExAttributeType = meta.type === 'choice' && choices ? 'choice' : declared;
    return { id: guidOf(v, 'guid', 'Variable'), name: (attr(v, 'name') ?? '').trim() || 'Attribute', type, ...(type === 'choice' ? { choices } : {}) };
  });
  const attrIds = new Map(attributes.map((a) => [a.id, a]));
  const sourceIds = new Set(texts.map((t) => t.id));
  const cases: ExCase[] = kids(child(p, 'Cases'), 'Case').map((c) => {
    const id = guidOf(c, 'guid', 'Case');
    const { meta } = unpackMeta(textOf(c, 'Description'));
    const values: Record<string, ExValue> = {};
    for (const vv of kids(c, 'VariableValue')) {
      const ref = child(vv, 'VariableRef');
      const a = attrIds.get(ref ? normaliseGuid(attr(ref, 'targetGUID')) ?? '' : '');
      if (!a) throw new ExchangeError('bad_reference', `Case "${attr(c, 'name') ?? id}": a value names a variable that is not in the file`);
      const v = readValue(vv);
      if (v !== undefined) values[a.id] = a.type === 'choice' && !a.choices?.includes(String(v)) ? null : v;
    }
    const textIds = kids(c, 'SourceRef').map((r) => normaliseGuid(attr(r, 'targetGUID')) ?? '').filter((t) => sourceIds.has(t));
    return { id, name: (attr(c, 'name') ?? '').trim() || 'Case', kind: meta.kind || 'participant', values, textIds };
  });
  const groups = readSets(child(p, 'Sets'), codeIds, sourceIds, warnings);
  attach(kids(p, 'NoteRef'), { kind: 'study' });
  opts.onProgress?.(0.8);
  return {
    title: (attr(p, 'name') ?? '').trim(),
    description: textOf(p, 'Description') ?? '',
    coders,
    codes: part.codes,
    groups,
    attributes,
    cases,
    memos,
    texts,
    segments,
    exampleQuotes: part.exampleQuotes,
    endReading,
    warnings,
    origin,
  };
}

function sourceText(files: Map<string, Uint8Array>, path: string, what: string, decode: (b: Uint8Array, what: string) => string): string {
  const m = /^internal:\/\/(.+)$/.exec(path.trim());
  if (!m) throw new ExchangeError('unsupported_source', `${what}: its file is at "${path}", outside the archive; only internal:// sources are read`);
  const name = `sources/${m[1]}`;
  const bytes = files.get(name);
  if (!bytes) throw new ExchangeError('missing_source', `${what}: its file ${name} is not in the archive`);
  return decode(bytes, name).replace(/^\uFEFF/, '');
}

/** Turns packed by Gloss ([[startCodePoint, speaker, startMs, endMs], …]); otherwise one turn per line. */
function turnsOf(packed: string | undefined, content: string, map: OffsetMap): ExTurn[] {
  if (packed) {
    try {
      const rows = JSON.parse(packed) as unknown;
      if (Array.isArray(rows) && rows.length > 0) {
        const turns: ExTurn[] = [];
        let prev = -1;
        for (const r of rows) {
          if (!Array.isArray(r) || !Number.isInteger(r[0])) throw new Error('shape');
          const start = map.toUtf16(r[0] as number);
          if (start <= prev || start > content.length || (turns.length > 0 && content[start - 1] !== '\n')) throw new Error('order');
          turns.push({ start, speaker: typeof r[1] === 'string' ? r[1] : null, startMs: typeof r[2] === 'number' ? r[2] : null, endMs: typeof r[3] === 'number' ? r[3] : null });
          prev = start;
        }
        if (turns[0]!.start === 0) return turns;
      }
    } catch {
      // not our packing after all: fall through to lines
    }
  }
  const turns: ExTurn[] = [{ start: 0, speaker: null, startMs: null, endMs: null }];
  for (let i = content.indexOf('\n'); i >= 0; i = content.indexOf('\n', i + 1)) turns.push({ start: i + 1, speaker: null, startMs: null, endMs: null });
  return turns;
}
