/**
 * Candidate identifiers across a study's texts (DESIGN §8, issue 12 item 6): names of people, places
 * and organisations found by compromise (an English NLP library; DEVELOPERS.md says why this one),
 * dates, ages, phone numbers, e-mail and street addresses found by rules, and the study's own list.
 * Pure: the texts come in as strings. A reviewer decides on every candidate; nothing is replaced here.
 */
import nlp from 'compromise';
import { planEdits } from '@gloss/model';

export const CANDIDATE_KINDS = ['listed', 'email', 'phone', 'address', 'date', 'age', 'person', 'organisation', 'place'] as const;
export type CandidateKind = (typeof CANDIDATE_KINDS)[number];

export interface Candidate {
  original: string;
  kind: CandidateKind;
  /** Whole-word occurrences across the study's texts. */
  occurrences: number;
  /** Ids of the texts it occurs in. */
  textIds: string[];
  /** Where it was found: 'texts' and the study's other places (codebook, memos, segment notes, comments, text titles, study details, round names). */
  where: string[];
  /** The words around its first occurrence, for the reviewer. */
  context: string;
  /** A pseudonym: the one in the study's key when there is one, else the next free of its kind. */
  suggestion: string;
}

const MONTH = '(?:January|February|March|April|May|June|July|August|September|October|November|December|Jan|Feb|Mar|Apr|Jun|Jul|Aug|Sep|Sept|Oct|Nov|Dec)\\.?';
const STREET = '(?:Street|St|Road|Rd|Avenue|Ave|Lane|Ln|Drive|Dr|Close|Way|Court|Crescent|Terrace|Place|Gardens|Row|Hill)';

/** Rules for what has a recognisable shape (common practice in de-identification tools; from memory). */
const RULES: Array<{ kind: CandidateKind; re: RegExp }> = [
  { kind: 'email', re: /[\p{L}\p{N}._%+-]+@[\p{L}\p{N}-]+(?:\.[\p{L}\p{N}-]+)+/gu },
  // at least nine digits, optionally grouped and with a country code
  { kind: 'phone', re: /(?<![\p{N}])(?:\+\d{1,3}[ -]?)?(?:\(\d{2,5}\)[ -]?|\d{2,5}[ -])?\d{3,4}[ -]?\d{3,4}(?![\p{N}])/gu },
  { kind: 'address', re: new RegExp(`\\b\\d{1,5}[a-z]?,? (?:[A-Z][\\p{L}'-]+ ){1,3}${STREET}\\b`, 'gu') },
  { kind: 'date', re: new RegExp(`\\b(?:\\d{1,2}(?:st|nd|rd|th)? (?:of )?${MONTH},? \\d{4}|${MONTH} \\d{1,2}(?:st|nd|rd|th)?,? \\d{4}|\\d{1,2}(?:st|nd|rd|th)? (?:of )?${MONTH}|${MONTH} \\d{4}|\\d{1,2}[/.-]\\d{1,2}[/.-]\\d{2,4})\\b`, 'gu') },
  { kind: 'age', re: /\b(?:\d{1,3}[- ]years?[- ]old|aged? \d{1,3}|(?:I am|I'm|she is|he is|she's|he's) \d{1,3}(?= years|\b(?! ?%)))\b/giu },
];

const TITLES = /^(?:(?:Dr|Mr|Mrs|Ms|Miss|Prof|Professor|Sister|Father|Auntie|Uncle)\.? )+/;
/**
 * Last words that make a "person" a street ("Tanner's Row" in the demo's memos): only those that are
 * rarely surnames (Hill, Way, Court and Close are, so they are left to the reviewer).
 */
const STREET_END = /\s(?:Street|Road|Avenue|Lane|Row|Terrace|Crescent|Gardens|Drive)$/u;

/** A name as compromise returns it, trimmed to its capitalised words ("sister Priya" → "Priya"). */
function cleanName(raw: string): string {
  const words = raw.replace(/[.,;:!?'"’)]+$/u, '').replace(/^['"(‘“]+/u, '').split(/\s+/);
  while (words.length > 0 && !/^\p{Lu}/u.test(words[0]!)) words.shift();
  while (words.length > 0 && !/^\p{Lu}/u.test(words.at(-1)!)) words.pop();
  return words.join(' ').replace(/['’]s$/u, '').replace(TITLES, '');
}

/** Capitalised words right after `end` ("Priya" + " Okonkwo"): compromise sometimes stops at the first name. */
function extendName(text: string, end: number): number {
  const m = /^(?: \p{Lu}[\p{L}'’-]+)+/u.exec(text.slice(end));
  return m ? end + m[0].length : end;
}

function nlpNames(text: string): Array<{ original: string; kind: CandidateKind }> {
  const doc = nlp(text);
  const out: Array<{ original: string; kind: CandidateKind }> = [];
  type Hit = { text: string; offset: { start: number; length: number } };
  const take = (hits: Hit[], kind: CandidateKind) => {
    for (const h of hits) {
      const hitEnd = h.offset.start + h.offset.length;
      // never across punctuation: "Bernadette. I've" or "Marrick, Jennet" are not one name
      const end = kind === 'person' && !/[.,;:!?]$/.test(text.slice(h.offset.start, hitEnd)) ? extendName(text, hitEnd) : hitEnd;
      const original = cleanName(text.slice(h.offset.start, end).split(/[.,;:!?]\s/u)[0]!);
      if (original.length > 1) out.push({ original, kind: kind === 'person' && STREET_END.test(original) ? 'place' : kind });
    }
  };
  take(doc.people().json({ offset: true }) as Hit[], 'person');
  take(doc.organizations().json({ offset: true }) as Hit[], 'organisation');
  take(doc.places().json({ offset: true }) as Hit[], 'place');
  return out;
}

const LABEL: Record<CandidateKind, { word: string; letters: boolean }> = {
  person: { word: 'Person', letters: false },
  place: { word: 'Place', letters: true },
  organisation: { word: 'Organisation', letters: true },
  listed: { word: 'Name', letters: false },
  date: { word: 'date', letters: false },
  age: { word: 'age', letters: false },
  phone: { word: 'phone', letters: false },
  email: { word: 'email', letters: false },
  address: { word: 'address', letters: false },
};
const UNNUMBERED = new Set<CandidateKind>(['date', 'age', 'phone', 'email', 'address']);

const letter = (n: number): string => (n <= 26 ? String.fromCharCode(64 + n) : letter(Math.floor((n - 1) / 26)) + String.fromCharCode(65 + ((n - 1) % 26)));

/** Hands out pseudonyms per kind, continuing after those already in the key. */
export function pseudonymSequence(existing: Iterable<string>) {
  const used = new Set(existing);
  const next = new Map<CandidateKind, number>();
  return (kind: CandidateKind): string => {
    const { word, letters } = LABEL[kind];
    if (UNNUMBERED.has(kind)) return `[${word}]`;
    for (let n = next.get(kind) ?? 1; ; n++) {
      const p = `[${word} ${letters ? letter(n) : n}]`;
      if (!used.has(p)) {
        used.add(p);
        next.set(kind, n + 1);
        return p;
      }
    }
  };
}

function contextAt(text: string, start: number, end: number): string {
  const a = Math.max(0, start - 40);
  const b = Math.min(text.length, end + 40);
  return `${a > 0 ? '…' : ''}${text.slice(a, b).replace(/\s+/g, ' ')}${b < text.length ? '…' : ''}`;
}

/**
 * A piece of the study's words: a transcript (no `where`), or a string from elsewhere, named by `where`
 * (its `id` then only tells pieces apart).
 */
export interface Source {
  id: string;
  text: string;
  where?: string;
}

export function findCandidates(
  texts: readonly Source[],
  listed: readonly string[],
  key: ReadonlyMap<string, string>,
): Candidate[] {
  const found = new Map<string, CandidateKind>();
  const note = (original: string, kind: CandidateKind) => {
    const o = original.trim();
    if (o.length < 2 || /^\[.*\]$/.test(o)) return; // pseudonyms already in the text are not identifiers
    const was = found.get(o);
    if (was === undefined || CANDIDATE_KINDS.indexOf(kind) < CANDIDATE_KINDS.indexOf(was)) found.set(o, kind);
  };
  for (const term of listed) note(term, 'listed');
  for (const { text } of texts) {
    for (const { kind, re } of RULES) for (const m of text.matchAll(re)) note(m[0], kind);
    for (const { original, kind } of nlpNames(text)) note(original, kind);
  }
  const nextFor = pseudonymSequence(key.values());
  // Counted with all candidates at once, as they will be replaced: "Dana" inside "Dana Whitcombe" is not a "Dana".
  const all = [...found.keys()].map((original) => ({ original, pseudonym: original }));
  const tally = new Map<string, { occurrences: number; textIds: string[]; where: string[]; context: string }>();
  for (const t of texts) {
    const where = t.where ?? 'texts';
    for (const e of planEdits(t.text, all)) {
      const original = t.text.slice(e.start, e.end);
      const entry = tally.get(original) ?? { occurrences: 0, textIds: [], where: [], context: contextAt(t.text, e.start, e.end) };
      entry.occurrences++;
      if (t.where === undefined && !entry.textIds.includes(t.id)) entry.textIds.push(t.id);
      if (!entry.where.includes(where)) entry.where.push(where);
      tally.set(original, entry);
    }
  }
  const out: Candidate[] = [];
  for (const [original, kind] of found) {
    const entry = tally.get(original);
    if (entry) out.push({ original, kind, ...entry, suggestion: '' });
  }
  // Longest first, so "Dana Whitcombe" gets its pseudonym before "Dana", which then shares it.
  out.sort((a, b) => CANDIDATE_KINDS.indexOf(a.kind) - CANDIDATE_KINDS.indexOf(b.kind) || b.original.length - a.original.length);
  const given = new Map<string, string>();
  for (const c of out) {
    const known = key.get(c.original);
    const firstName = c.kind === 'person' ? [...given].find(([o]) => o.split(' ')[0] === c.original && o.includes(' '))?.[1] : undefined;
    c.suggestion = known ?? firstName ?? nextFor(c.kind);
    given.set(c.original, c.suggestion);
  }
  return out;
}
