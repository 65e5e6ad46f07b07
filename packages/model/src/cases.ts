import * as Y from 'yjs';
import { InvalidArgumentError, NotFoundError } from './errors.js';
import { newId } from './ids.js';

/**
 * Cases (participants, sites, ...) and their attributes, kept apart from codes. They live in the study's
 * codebook document under their own roots, so one document carries the study's analytic frame:
 *   attributes  Y.Map<attrId, {name, type, choices?}>
 *   cases       Y.Map<caseId, Y.Map{name, kind, values: Y.Map<attrId, value>, texts: Y.Map<textId, true>,
 *                                   speakers?: Y.Map<textId, speaker label>}>
 * `speakers` says which voice of a text is this case (set when an import maps speakers to cases).
 */
export const ATTRIBUTES_ROOT = 'attributes';
export const CASES_ROOT = 'cases';

export const ATTRIBUTE_TYPES = ['text', 'number', 'date', 'boolean', 'choice'] as const;
export type AttributeType = (typeof ATTRIBUTE_TYPES)[number];
export type AttributeValue = string | number | boolean | null;

export interface AttributeDef {
  id: string;
  name: string;
  type: AttributeType;
  choices?: string[];
}

export interface CaseView {
  id: string;
  name: string;
  /** What sort of case: 'participant', 'site', or the study's own word. */
  kind: string;
  values: Record<string, AttributeValue>;
  textIds: string[];
  /** The speaker label this case has in each text where an import named it, by text id. */
  speakers: Record<string, string>;
}

const attrs = (doc: Y.Doc) => doc.getMap<AttributeDef>(ATTRIBUTES_ROOT);
const cases = (doc: Y.Doc) => doc.getMap<Y.Map<unknown>>(CASES_ROOT);

export function defineAttribute(doc: Y.Doc, def: Omit<AttributeDef, 'id'>): string {
  if (typeof def.name !== 'string' || def.name.trim() === '') throw new InvalidArgumentError('an attribute needs a name');
  if (!ATTRIBUTE_TYPES.includes(def.type)) throw new InvalidArgumentError(`attribute type must be one of ${ATTRIBUTE_TYPES.join(', ')}`);
  if (def.type === 'choice' && (!Array.isArray(def.choices) || def.choices.length === 0 || !def.choices.every((c) => typeof c === 'string'))) {
    throw new InvalidArgumentError('a choice attribute needs a list of choices');
  }
  for (const a of attrs(doc).values()) {
    if (a.name === def.name.trim()) throw new InvalidArgumentError(`attribute already defined: ${a.name}`);
  }
  const id = newId('a');
  const stored: AttributeDef = { id, name: def.name.trim(), type: def.type };
  if (def.type === 'choice') stored.choices = [...def.choices!];
  attrs(doc).set(id, stored);
  return id;
}

export function listAttributes(doc: Y.Doc): AttributeDef[] {
  return [...attrs(doc).values()].sort((a, b) => a.name.localeCompare(b.name));
}

function requireAttr(doc: Y.Doc, id: string): AttributeDef {
  const a = attrs(doc).get(id);
  if (a === undefined) throw new NotFoundError('attribute', id);
  return a;
}

function requireCase(doc: Y.Doc, id: string): Y.Map<unknown> {
  const c = cases(doc).get(id);
  if (!(c instanceof Y.Map)) throw new NotFoundError('case', id);
  return c;
}

/** Check a value against its attribute's type. Dates are ISO 8601 calendar dates (YYYY-MM-DD). */
export function checkAttributeValue(def: AttributeDef, value: AttributeValue): AttributeValue {
  if (value === null) return null;
  const bad = () => new InvalidArgumentError(`value ${JSON.stringify(value)} does not fit ${def.type} attribute ${def.name}`);
  switch (def.type) {
    case 'text':
      if (typeof value !== 'string') throw bad();
      return value;
    case 'number':
      if (typeof value !== 'number' || !Number.isFinite(value)) throw bad();
      return value;
    case 'boolean':
      if (typeof value !== 'boolean') throw bad();
      return value;
    case 'date': {
      if (typeof value !== 'string' || !/^\d{4}-\d{2}-\d{2}$/.test(value)) throw bad();
      const d = new Date(value + 'T00:00:00Z');
      if (Number.isNaN(d.getTime()) || d.toISOString().slice(0, 10) !== value) throw bad();
      return value;
    }
    case 'choice':
      if (typeof value !== 'string' || !def.choices?.includes(value)) throw bad();
      return value;
  }
}

export function addCase(doc: Y.Doc, input: { name: string; kind?: string; textIds?: string[] }): string {
  if (typeof input.name !== 'string' || input.name.trim() === '') throw new InvalidArgumentError('a case needs a name');
  const id = newId('p');
  doc.transact(() => {
    const c = new Y.Map<unknown>();
    const values = new Y.Map<AttributeValue>();
    const texts = new Y.Map<boolean>();
    c.set('name', input.name.trim());
    c.set('kind', input.kind ?? 'participant');
    c.set('values', values);
    c.set('texts', texts);
    cases(doc).set(id, c);
    for (const t of input.textIds ?? []) texts.set(t, true);
  });
  return id;
}

export function setCaseValue(doc: Y.Doc, caseId: string, attrId: string, value: AttributeValue): void {
  const c = requireCase(doc, caseId);
  const v = checkAttributeValue(requireAttr(doc, attrId), value);
  (c.get('values') as Y.Map<AttributeValue>).set(attrId, v);
}

/** Link (or unlink) a text to a case; a text may belong to several cases (an interview with two people). */
export function linkText(doc: Y.Doc, caseId: string, textId: string, linked = true): void {
  const texts = requireCase(doc, caseId).get('texts') as Y.Map<boolean>;
  if (linked) texts.set(textId, true);
  else texts.delete(textId);
}

/** Links a text to a case and records which speaker of that text the case is (an import's speaker mapping). */
export function linkSpeaker(doc: Y.Doc, caseId: string, textId: string, speaker: string): void {
  if (typeof speaker !== 'string' || speaker.trim() === '') throw new InvalidArgumentError('a speaker label is needed');
  const c = requireCase(doc, caseId);
  doc.transact(() => {
    (c.get('texts') as Y.Map<boolean>).set(textId, true);
    let speakers = c.get('speakers');
    if (!(speakers instanceof Y.Map)) c.set('speakers', (speakers = new Y.Map<string>()));
    (speakers as Y.Map<string>).set(textId, speaker.trim());
  });
}

export function removeCase(doc: Y.Doc, caseId: string): void {
  requireCase(doc, caseId);
  cases(doc).delete(caseId);
}

function readCase(id: string, c: Y.Map<unknown>): CaseView {
  const values = c.get('values');
  const texts = c.get('texts');
  const speakers = c.get('speakers');
  return {
    id,
    name: String(c.get('name') ?? ''),
    kind: String(c.get('kind') ?? 'participant'),
    values: values instanceof Y.Map ? (values.toJSON() as Record<string, AttributeValue>) : {},
    textIds: texts instanceof Y.Map ? [...texts.keys()].sort() : [],
    speakers: speakers instanceof Y.Map ? (speakers.toJSON() as Record<string, string>) : {},
  };
}

export function getCase(doc: Y.Doc, id: string): CaseView {
  return readCase(id, requireCase(doc, id));
}

export function listCases(doc: Y.Doc): CaseView[] {
  const out: CaseView[] = [];
  cases(doc).forEach((c, id) => {
    if (c instanceof Y.Map) out.push(readCase(id, c));
  });
  return out.sort((a, b) => a.name.localeCompare(b.name) || (a.id < b.id ? -1 : 1));
}

export function casesForText(doc: Y.Doc, textId: string): CaseView[] {
  return listCases(doc).filter((c) => c.textIds.includes(textId));
}
