/**
 * The study's codebook document: root Y.Map "codes" (code id -> Y.Map with `label` and the entry's
 * fields, after MacQueen et al. 1998), Y.Map "sets" (mutually exclusive sets) and Y.Array "history".
 * Definition fields are Y.Text so several people can edit them at once.
 */
import * as Y from 'yjs';
import { newId } from './segments.js';

export const TEXT_FIELDS = ['brief', 'definition', 'inclusion', 'exclusion'] as const;
export type TextField = (typeof TEXT_FIELDS)[number];
export const FIELD_LABELS: Record<TextField, string> = {
  brief: 'Brief definition',
  definition: 'Full definition',
  inclusion: 'When to use (inclusion)',
  exclusion: 'When not to use (exclusion)',
};
export type CodeStatus = 'draft' | 'active' | 'merged' | 'retired';
export type CodeType = 'theory-driven' | 'data-driven' | 'structural' | 'theme';

export interface CodeExampleRef { textId: string; segmentId: string; quote: string; nearMiss: boolean }

export interface Code {
  id: string;
  label: string;
  brief: string;
  parent: string | null;
  colour?: string;
  type: CodeType;
  status: CodeStatus;
  mergedInto?: string;
  examples: CodeExampleRef[];
}

export interface ExclusiveSet { id: string; label: string; codeIds: string[] }
export interface HistoryEntry { at: number; by: string; codeId: string; what: string; why?: string }

export class CodebookError extends Error {
  constructor(readonly code: 'no_such_code' | 'empty_label' | 'bad_target', message: string) {
    super(message);
    this.name = 'CodebookError';
  }
}

export const codesOf = (d: Y.Doc): Y.Map<Y.Map<unknown>> => d.getMap('codes');
export const setsOf = (d: Y.Doc): Y.Map<Y.Map<unknown>> => d.getMap('sets');
export const historyOf = (d: Y.Doc): Y.Array<Record<string, unknown>> => d.getArray('history');

const textOf = (v: unknown): string => (v instanceof Y.Text ? v.toString() : typeof v === 'string' ? v : '');

export function readCodes(d: Y.Doc): Code[] {
  const out: Code[] = [];
  codesOf(d).forEach((m, id) => {
    const ex = m.get('examples');
    out.push({
      id,
      label: textOf(m.get('label')) || '(no label)',
      brief: textOf(m.get('brief')),
      parent: (m.get('parent') as string | undefined) ?? null,
      colour: m.get('colour') as string | undefined,
      type: ((m.get('type') as CodeType | undefined) ?? 'data-driven'),
      status: ((m.get('status') as CodeStatus | undefined) ?? 'active'),
      mergedInto: m.get('mergedInto') as string | undefined,
      examples: ex instanceof Y.Array ? (ex.toArray() as CodeExampleRef[]) : [],
    });
  });
  return out.sort((a, b) => a.label.localeCompare(b.label));
}

export function readSets(d: Y.Doc): ExclusiveSet[] {
  const out: ExclusiveSet[] = [];
  setsOf(d).forEach((m, id) => {
    const ids = m.get('codeIds');
    out.push({ id, label: String(m.get('label') ?? ''), codeIds: ids instanceof Y.Array ? (ids.toArray() as string[]) : [] });
  });
  return out;
}

export function readHistory(d: Y.Doc): HistoryEntry[] {
  return historyOf(d).toArray() as unknown as HistoryEntry[];
}

function entry(d: Y.Doc, id: string): Y.Map<unknown> {
  const m = codesOf(d).get(id);
  if (!m) throw new CodebookError('no_such_code', 'That code is not in the codebook.');
  return m;
}

export function log(d: Y.Doc, by: string, codeId: string, what: string, why?: string): void {
  historyOf(d).push([{ at: Date.now(), by, codeId, what, ...(why ? { why } : {}) }]);
}

export function createCode(d: Y.Doc, by: string, label: string, opts: { parent?: string | null; type?: CodeType; brief?: string } = {}): string {
  const clean = label.trim();
  if (!clean) throw new CodebookError('empty_label', 'A code needs a label.');
  const id = newId();
  d.transact(() => {
    const m = new Y.Map<unknown>();
    codesOf(d).set(id, m);
    m.set('label', clean);
    for (const f of TEXT_FIELDS) m.set(f, new Y.Text(f === 'brief' ? opts.brief ?? '' : ''));
    m.set('parent', opts.parent ?? null);
    m.set('type', opts.type ?? 'data-driven');
    m.set('status', 'active');
    m.set('examples', new Y.Array());
    log(d, by, id, `created “${clean}”`);
  });
  return id;
}

/** The shared Y.Text of one definition field, created on first use (older entries may hold a string). */
export function fieldText(d: Y.Doc, id: string, field: TextField): Y.Text {
  const m = entry(d, id);
  const v = m.get(field);
  if (v instanceof Y.Text) return v;
  const t = new Y.Text(typeof v === 'string' ? v : '');
  m.set(field, t);
  return t;
}

export function setCodeProp(d: Y.Doc, by: string, id: string, key: 'label' | 'parent' | 'colour' | 'type' | 'status', value: string | null): void {
  const m = entry(d, id);
  if (key === 'label' && !value?.trim()) throw new CodebookError('empty_label', 'A code needs a label.');
  if (key === 'parent' && value === id) throw new CodebookError('bad_target', 'A code cannot be its own parent.');
  d.transact(() => {
    m.set(key, value);
    if (key !== 'label') log(d, by, id, `${key} → ${value ?? 'none'}`);
  });
}

export function addExample(d: Y.Doc, id: string, ex: CodeExampleRef): void {
  const m = entry(d, id);
  let arr = m.get('examples');
  if (!(arr instanceof Y.Array)) {
    arr = new Y.Array();
    m.set('examples', arr);
  }
  (arr as Y.Array<CodeExampleRef>).push([ex]);
}

export function createSet(d: Y.Doc, label: string, codeIds: string[]): string {
  const id = newId();
  d.transact(() => {
    const m = new Y.Map<unknown>();
    setsOf(d).set(id, m);
    m.set('label', label);
    const arr = new Y.Array<string>();
    arr.push(codeIds);
    m.set('codeIds', arr);
  });
  return id;
}
