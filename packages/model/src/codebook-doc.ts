import * as Y from 'yjs';
import { ConflictError, InvalidArgumentError, NotFoundError } from './errors.js';
import { newId, systemClock, type Clock } from './ids.js';
import { isHexColour, paletteColour } from './palette.js';

/**
 * The codebook document (one per study). Entry structure after MacQueen, McLellan, Kay & Milstein (1998),
 * "Codebook development for team-based qualitative analysis", Cultural Anthropology Methods 10(2):
 * label, brief definition, full definition, when to use, when not to use, examples; code types after
 * DeCuir-Gunby, Marshall & McCulloch (2011). Roots:
 *   codes          Y.Map<codeId, Y.Map>  (DESIGN §2 contract)
 *   themes         Y.Map<themeId, Y.Map{label, codes: Y.Map<codeId, true>}>
 *   exclusiveSets  Y.Map<setId, Y.Map{label, codes: Y.Map<codeId, true>}>
 *   changes        Y.Array<ChangeEntry>  (the change log)
 *   fieldEdits     Y.Map<key, FieldEditRecord>  (causal records for definition-race, see field-edits.ts)
 *   meta           Y.Map{round}
 *   cases, attributes (see cases.ts)
 */
export const CODES_ROOT = 'codes';
export const THEMES_ROOT = 'themes';
export const EXCLUSIVE_ROOT = 'exclusiveSets';
export const CHANGES_ROOT = 'changes';
export const META_ROOT = 'meta';

export const DEFINITION_FIELDS = ['briefDefinition', 'fullDefinition', 'inclusion', 'exclusion'] as const;
export type DefinitionField = (typeof DEFINITION_FIELDS)[number];
export const CODE_TYPES = ['theory-driven', 'data-driven', 'structural'] as const;
export type CodeType = (typeof CODE_TYPES)[number];
export const CODE_STATUSES = ['draft', 'active', 'merged', 'retired'] as const;
export type CodeStatus = (typeof CODE_STATUSES)[number];

/** An example or near-miss: a link to a real segment, with the words quoted when it was chosen. */
export interface CodeExample {
  id: string;
  textId: string;
  segmentId?: string;
  /** Encoded RelativePositions into the text, so the link follows corrections. */
  start?: Uint8Array;
  end?: Uint8Array;
  quote: string;
}

export interface CodeView {
  id: string;
  label: string;
  briefDefinition: string;
  fullDefinition: string;
  inclusion: string;
  exclusion: string;
  examples: CodeExample[];
  nearMisses: CodeExample[];
  parentId: string | null;
  colour: string;
  type: CodeType;
  status: CodeStatus;
  mergedInto: string | null;
  splitInto: string[];
  inVivo: boolean;
  createdAt: number;
  createdBy: string;
}

export interface NewCode {
  /** Supply an id when other records must name the code before it exists (a split's assignment). */
  id?: string;
  label: string;
  briefDefinition?: string;
  fullDefinition?: string;
  inclusion?: string;
  exclusion?: string;
  parentId?: string | null;
  colour?: string;
  type?: CodeType;
  status?: CodeStatus;
  inVivo?: boolean;
}

export type ChangeKind =
  | 'add' | 'edit' | 'rename' | 'move' | 'merge' | 'split' | 'retire' | 'status'
  | 'example' | 'theme' | 'exclusive-set' | 'round';

/** One change-log line: who, when, what, why, which round. */
export interface ChangeEntry {
  id: string;
  at: number;
  by: string;
  kind: ChangeKind;
  codeIds: string[];
  field?: string;
  reason?: string;
  round: number;
  detail?: string;
  /** A definition edit's text before and after the run of typing it records (kind 'edit', `field` set). */
  before?: string;
  after?: string;
}

/** Who acts, and optionally why and when (the clock is injectable for tests). */
export interface Actor {
  by: string;
  reason?: string;
  clock?: Clock;
}

export function createCodebookDoc(): Y.Doc {
  // gc off: named versions are snapshots, and snapshots need deleted content kept.
  return new Y.Doc({ gc: false });
}

export const codesMap = (cb: Y.Doc) => cb.getMap<Y.Map<unknown>>(CODES_ROOT);
export const changesArray = (cb: Y.Doc) => cb.getArray<ChangeEntry>(CHANGES_ROOT);
const metaMap = (cb: Y.Doc) => cb.getMap<unknown>(META_ROOT);

export function requireCodeMap(cb: Y.Doc, id: string): Y.Map<unknown> {
  const m = codesMap(cb).get(id);
  if (!(m instanceof Y.Map)) throw new NotFoundError('code', id);
  return m;
}

/** The current calibration round (0 before the first). */
export function currentRound(cb: Y.Doc): number {
  const r = metaMap(cb).get('round');
  return typeof r === 'number' ? r : 0;
}

export function startRound(cb: Y.Doc, actor: Actor): number {
  const next = currentRound(cb) + 1;
  cb.transact(() => {
    metaMap(cb).set('round', next);
    logChange(cb, actor, 'round', [], { detail: `round ${next} started` });
  });
  return next;
}

/**
 * Sets the round number that definition edits are stamped with from now on (a server's calibration
 * round, numbered by the server), logging it with `detail`. Never goes back: a lower number is ignored.
 */
export function enterRound(cb: Y.Doc, round: number, actor: Actor, detail: string): boolean {
  if (!Number.isInteger(round) || round < 1) throw new InvalidArgumentError('a round number is a whole number from 1');
  if (currentRound(cb) >= round) return false;
  cb.transact(() => {
    metaMap(cb).set('round', round);
    logChange(cb, actor, 'round', [], { detail });
  });
  return true;
}

export function logChange(cb: Y.Doc, actor: Actor, kind: ChangeKind, codeIds: string[], extra: { field?: string; detail?: string; before?: string; after?: string } = {}): ChangeEntry {
  const entry: ChangeEntry = {
    id: newId('c'),
    at: (actor.clock ?? systemClock)(),
    by: actor.by,
    kind,
    codeIds,
    round: currentRound(cb),
  };
  if (extra.field !== undefined) entry.field = extra.field;
  if (extra.detail !== undefined) entry.detail = extra.detail;
  if (extra.before !== undefined) entry.before = extra.before;
  if (extra.after !== undefined) entry.after = extra.after;
  if (actor.reason !== undefined) entry.reason = actor.reason;
  changesArray(cb).push([entry]);
  return entry;
}

export function listChanges(cb: Y.Doc, codeId?: string): ChangeEntry[] {
  const all = changesArray(cb).toArray();
  return codeId === undefined ? all : all.filter((c) => c.codeIds.includes(codeId));
}

function checkLabel(label: unknown): string {
  if (typeof label !== 'string' || label.trim().length === 0) throw new InvalidArgumentError('a code needs a non-empty label');
  return label.trim();
}

function checkEnum<T extends string>(value: unknown, allowed: readonly T[], what: string): T {
  if (!allowed.includes(value as T)) throw new InvalidArgumentError(`${what} must be one of ${allowed.join(', ')}`);
  return value as T;
}

/** Validate a parent for `self`: it must exist and not be `self` or one of its descendants. */
export function checkParentFor(cb: Y.Doc, parentId: string | null | undefined, self?: string): string | null {
  if (parentId === null || parentId === undefined) return null;
  requireCodeMap(cb, parentId);
  if (self !== undefined) {
    for (let p: string | null = parentId, guard = 0; p !== null && guard < 10_000; guard++) {
      if (p === self) throw new ConflictError(`code ${self} cannot be placed under its own descendant ${parentId}`);
      const pm = codesMap(cb).get(p);
      p = pm instanceof Y.Map ? ((pm.get('parentId') as string | null) ?? null) : null;
    }
  }
  return parentId;
}

export function addCode(cb: Y.Doc, input: NewCode, actor: Actor): string {
  const label = checkLabel(input.label);
  const id = input.id ?? newId('k');
  if (codesMap(cb).has(id)) throw new ConflictError(`code id already used: ${id}`);
  const type = checkEnum(input.type ?? 'data-driven', CODE_TYPES, 'type');
  const status = checkEnum(input.status ?? 'active', CODE_STATUSES, 'status');
  if (input.colour !== undefined && !isHexColour(input.colour)) throw new InvalidArgumentError('colour must be #RRGGBB');
  cb.transact(() => {
    const parentId = checkParentFor(cb, input.parentId);
    const m = new Y.Map<unknown>();
    m.set('label', label);
    for (const f of DEFINITION_FIELDS) m.set(f, new Y.Text(input[f] ?? ''));
    m.set('examples', new Y.Array<CodeExample>());
    m.set('nearMisses', new Y.Array<CodeExample>());
    m.set('parentId', parentId);
    m.set('colour', input.colour ?? paletteColour(codesMap(cb).size).hex);
    m.set('type', type);
    m.set('status', status);
    m.set('mergedInto', null);
    m.set('splitInto', []);
    m.set('inVivo', input.inVivo ?? false);
    m.set('createdAt', (actor.clock ?? systemClock)());
    m.set('createdBy', actor.by);
    codesMap(cb).set(id, m);
    logChange(cb, actor, 'add', [id], { detail: label });
  });
  return id;
}

/**
 * An in vivo code: its label is the participant's own words, in quotation marks (common practice in
 * first-cycle coding; the quotation marks say the words are theirs).
 */
export function addInVivoCode(cb: Y.Doc, words: string, actor: Actor, extra: Omit<NewCode, 'label' | 'inVivo'> = {}): string {
  const clean = String(words).replace(/\s+/g, ' ').trim().replace(/^["“”]+|["“”]+$/g, '');
  if (clean.length === 0) throw new InvalidArgumentError('in vivo code needs some selected words');
  return addCode(cb, { ...extra, label: `“${clean}”`, inVivo: true }, actor);
}

/** The live Y.Text of one definition field, for an editor binding. */
export function getDefinitionText(cb: Y.Doc, codeId: string, field: DefinitionField): Y.Text {
  checkEnum(field, DEFINITION_FIELDS, 'field');
  const t = requireCodeMap(cb, codeId).get(field);
  if (!(t instanceof Y.Text)) throw new NotFoundError('definition field', `${codeId}.${field}`);
  return t;
}

/** Replace a Y.Text's content touching only the changed middle, so concurrent edits elsewhere survive. */
export function replaceText(t: Y.Text, value: string): void {
  const old = t.toString();
  let p = 0;
  while (p < old.length && p < value.length && old[p] === value[p]) p++;
  let s = 0;
  while (s < old.length - p && s < value.length - p && old[old.length - 1 - s] === value[value.length - 1 - s]) s++;
  const del = old.length - p - s;
  const ins = value.slice(p, value.length - s);
  if (del > 0) t.delete(p, del);
  if (ins.length > 0) t.insert(p, ins);
}

export type ScalarField = 'colour' | 'type' | 'status';
export type CodeField = DefinitionField | ScalarField;

/** Set one field of a code (definition fields by minimal text change) and log it. Label and parent have their own operations. */
export function updateCodeField(cb: Y.Doc, codeId: string, field: CodeField, value: string, actor: Actor): void {
  const m = requireCodeMap(cb, codeId);
  if (typeof value !== 'string') throw new InvalidArgumentError(`${field} must be a string`);
  cb.transact(() => {
    if ((DEFINITION_FIELDS as readonly string[]).includes(field)) {
      replaceText(getDefinitionText(cb, codeId, field as DefinitionField), value);
    } else if (field === 'colour') {
      if (!isHexColour(value)) throw new InvalidArgumentError('colour must be #RRGGBB');
      m.set('colour', value);
    } else if (field === 'type') {
      m.set('type', checkEnum(value, CODE_TYPES, 'type'));
    } else if (field === 'status') {
      m.set('status', checkEnum(value, CODE_STATUSES, 'status'));
    } else {
      throw new InvalidArgumentError(`unknown code field: ${String(field)}`);
    }
    logChange(cb, actor, field === 'status' ? 'status' : 'edit', [codeId], { field });
  });
}

export function addExample(cb: Y.Doc, codeId: string, example: Omit<CodeExample, 'id'>, kind: 'example' | 'near-miss', actor: Actor): string {
  const m = requireCodeMap(cb, codeId);
  if (typeof example.textId !== 'string' || typeof example.quote !== 'string') throw new InvalidArgumentError('an example needs textId and quote');
  const id = newId('e');
  cb.transact(() => {
    (m.get(kind === 'example' ? 'examples' : 'nearMisses') as Y.Array<CodeExample>).push([{ ...example, id }]);
    logChange(cb, actor, 'example', [codeId], { field: kind === 'example' ? 'examples' : 'nearMisses', detail: example.quote.slice(0, 80) });
  });
  return id;
}

export function removeExample(cb: Y.Doc, codeId: string, exampleId: string, actor: Actor): void {
  const m = requireCodeMap(cb, codeId);
  for (const key of ['examples', 'nearMisses'] as const) {
    const arr = m.get(key) as Y.Array<CodeExample>;
    const i = arr.toArray().findIndex((e) => e.id === exampleId);
    if (i >= 0) {
      cb.transact(() => {
        arr.delete(i, 1);
        logChange(cb, actor, 'example', [codeId], { field: key, detail: `removed ${exampleId}` });
      });
      return;
    }
  }
  throw new NotFoundError('example', exampleId);
}

export function readCode(id: string, m: Y.Map<unknown>): CodeView {
  const str = (k: string) => {
    const v = m.get(k);
    return v instanceof Y.Text ? v.toString() : typeof v === 'string' ? v : '';
  };
  const arr = (k: string) => {
    const v = m.get(k);
    return v instanceof Y.Array ? (v.toArray() as CodeExample[]) : [];
  };
  return {
    id,
    label: str('label'),
    briefDefinition: str('briefDefinition'),
    fullDefinition: str('fullDefinition'),
    inclusion: str('inclusion'),
    exclusion: str('exclusion'),
    examples: arr('examples'),
    nearMisses: arr('nearMisses'),
    parentId: (m.get('parentId') as string | null) ?? null,
    colour: str('colour'),
    type: (m.get('type') as CodeType) ?? 'data-driven',
    status: (m.get('status') as CodeStatus) ?? 'active',
    mergedInto: (m.get('mergedInto') as string | null) ?? null,
    splitInto: Array.isArray(m.get('splitInto')) ? (m.get('splitInto') as string[]) : [],
    inVivo: m.get('inVivo') === true,
    createdAt: Number(m.get('createdAt') ?? 0),
    createdBy: str('createdBy'),
  };
}

export function getCode(cb: Y.Doc, id: string): CodeView {
  return readCode(id, requireCodeMap(cb, id));
}

export function hasCode(cb: Y.Doc, id: string): boolean {
  return codesMap(cb).get(id) instanceof Y.Map;
}

/** All codes, in creation order (then id). */
export function getCodes(cb: Y.Doc): CodeView[] {
  const out: CodeView[] = [];
  codesMap(cb).forEach((m, id) => {
    if (m instanceof Y.Map) out.push(readCode(id, m));
  });
  return out.sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}

export interface CodeTreeNode {
  code: CodeView;
  children: CodeTreeNode[];
}

/** The hierarchy as a forest. A code whose parent is missing is shown at the top rather than lost. */
export function codeTree(cb: Y.Doc): CodeTreeNode[] {
  const codes = getCodes(cb);
  const nodes = new Map(codes.map((c) => [c.id, { code: c, children: [] as CodeTreeNode[] }]));
  const roots: CodeTreeNode[] = [];
  for (const n of nodes.values()) {
    const parent = n.code.parentId === null ? undefined : nodes.get(n.code.parentId);
    // Concurrent moves can build a cycle; a node whose ancestor chain returns to itself goes to the top.
    if (parent === undefined || isInCycle(nodes, n.code.id)) roots.push(n);
    else parent.children.push(n);
  }
  return roots;
}

function isInCycle(nodes: Map<string, CodeTreeNode>, id: string): boolean {
  const seen = new Set<string>();
  let p = nodes.get(id)?.code.parentId ?? null;
  while (p !== null && !seen.has(p)) {
    if (p === id) return true;
    seen.add(p);
    p = nodes.get(p)?.code.parentId ?? null;
  }
  return false;
}

// ---- themes and mutually exclusive sets: both are named groups of codes ----

export interface CodeGroup {
  id: string;
  label: string;
  codeIds: string[];
}

function groupRoot(cb: Y.Doc, root: string) {
  return cb.getMap<Y.Map<unknown>>(root);
}

function addGroup(cb: Y.Doc, root: string, kind: ChangeKind, label: string, codeIds: string[], actor: Actor): string {
  const clean = checkLabel(label);
  for (const c of codeIds) requireCodeMap(cb, c);
  const id = newId(root === THEMES_ROOT ? 't' : 'x');
  cb.transact(() => {
    const g = new Y.Map<unknown>();
    const codes = new Y.Map<boolean>();
    g.set('label', clean);
    g.set('codes', codes);
    groupRoot(cb, root).set(id, g);
    for (const c of codeIds) codes.set(c, true);
    logChange(cb, actor, kind, codeIds, { detail: clean });
  });
  return id;
}

function setGroupMember(cb: Y.Doc, root: string, kind: ChangeKind, groupId: string, codeId: string, member: boolean, actor: Actor): void {
  const g = groupRoot(cb, root).get(groupId);
  if (!(g instanceof Y.Map)) throw new NotFoundError(kind, groupId);
  if (member) requireCodeMap(cb, codeId);
  cb.transact(() => {
    const codes = g.get('codes') as Y.Map<boolean>;
    if (member) codes.set(codeId, true);
    else codes.delete(codeId);
    logChange(cb, actor, kind, [codeId], { detail: `${member ? 'added to' : 'removed from'} ${String(g.get('label'))}` });
  });
}

function listGroups(cb: Y.Doc, root: string): CodeGroup[] {
  const out: CodeGroup[] = [];
  groupRoot(cb, root).forEach((g, id) => {
    if (!(g instanceof Y.Map)) return;
    const codes = g.get('codes');
    out.push({ id, label: String(g.get('label') ?? ''), codeIds: codes instanceof Y.Map ? [...codes.keys()].sort() : [] });
  });
  return out.sort((a, b) => (a.id < b.id ? -1 : 1));
}

/** A theme: a group of codes built in the second cycle. */
export const addTheme = (cb: Y.Doc, label: string, codeIds: string[], actor: Actor) => addGroup(cb, THEMES_ROOT, 'theme', label, codeIds, actor);
export const setThemeMember = (cb: Y.Doc, themeId: string, codeId: string, member: boolean, actor: Actor) =>
  setGroupMember(cb, THEMES_ROOT, 'theme', themeId, codeId, member, actor);
export const listThemes = (cb: Y.Doc) => listGroups(cb, THEMES_ROOT);

/** A mutually exclusive set: no two of its codes may be applied to overlapping text (flag `exclusive`). */
export const addExclusiveSet = (cb: Y.Doc, label: string, codeIds: string[], actor: Actor) =>
  addGroup(cb, EXCLUSIVE_ROOT, 'exclusive-set', label, codeIds, actor);
export const setExclusiveSetMember = (cb: Y.Doc, setId: string, codeId: string, member: boolean, actor: Actor) =>
  setGroupMember(cb, EXCLUSIVE_ROOT, 'exclusive-set', setId, codeId, member, actor);
export const listExclusiveSets = (cb: Y.Doc) => listGroups(cb, EXCLUSIVE_ROOT);

/** Longest before / after text kept in a definition-edit entry; longer ones keep their start and end. */
export const EDIT_TEXT_LIMIT = 2000;

function clip(s: string): string {
  if (s.length <= EDIT_TEXT_LIMIT) return s;
  const half = Math.floor((EDIT_TEXT_LIMIT - 1) / 2);
  return `${s.slice(0, half)}…${s.slice(s.length - half)}`;
}

/**
 * Records a finished run of live typing in one definition field (the editor left the field or paused)
 * in the change log: who, when, before → after, an optional reason. Nothing is logged when the text
 * ended where it started. The field's Y.Text itself is edited live elsewhere; this is its history.
 */
export function recordDefinitionEdit(cb: Y.Doc, actor: Actor, codeId: string, field: DefinitionField, before: string, after: string): ChangeEntry | null {
  requireCodeMap(cb, codeId);
  checkEnum(field, DEFINITION_FIELDS, 'field');
  if (before === after) return null;
  return logChange(cb, actor, 'edit', [codeId], { field, before: clip(before), after: clip(after) });
}

/** The newest definition edit of each code (for "updated" marks), by code id. */
export function lastDefinitionEdits(cb: Y.Doc): Map<string, ChangeEntry> {
  const out = new Map<string, ChangeEntry>();
  for (const c of changesArray(cb).toArray()) {
    if (c.kind !== 'edit' || c.before === undefined) continue;
    for (const id of c.codeIds) {
      const prev = out.get(id);
      if (!prev || prev.at <= c.at) out.set(id, c);
    }
  }
  return out;
}
