// Checks the demo study against the file contract in demo/README.md. Pure: takes parsed data, returns
// problems; never throws on bad data, so one run lists every problem at once.

export interface DemoBundle {
  study: unknown;
  index: unknown;
  codebook: unknown;
  groups: unknown;
  accounts: unknown;
  cases: unknown;
  memos: unknown;
  /** file name (inside texts/) -> contents */
  texts: Record<string, string>;
}

export interface DemoProblem {
  code: string;
  where: string;
  message: string;
}

export interface DemoReport {
  problems: DemoProblem[];
  /** words per text, speech only (timestamps and speaker prefixes not counted) */
  wordCounts: Record<string, number>;
}

export const MIN_WORDS = 1600;
/** `[hh:mm:ss] SPEAKER: words` — I is the interviewer; P01 a participant; P02b a second person in P02's interview. */
export const TURN = /^\[(\d{2}):([0-5]\d):([0-5]\d)\] (I|P\d{2}[a-z]?): (\S[\s\S]*)$/;
const ROLES = ['owner', 'lead', 'coder', 'trainee', 'observer'] as const;
const CODE_TYPES = ['theory-driven', 'data-driven', 'structural'];
const CODE_STATUSES = ['draft', 'active', 'merged', 'retired'];
const ATTR_TYPES = ['text', 'number', 'choice', 'date', 'boolean'];

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);
const isStr = (v: unknown): v is string => typeof v === 'string' && v.trim().length > 0;
const isDate = (v: unknown): v is string =>
  typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(v + 'T00:00:00Z'));

/** Words as whitespace-separated tokens (common practice for transcript length); a lone dash and
 * bracketed transcriber notes such as [laughs] or [long pause] are not words. */
export function countWords(s: string): number {
  return s.replace(/\[[^\]]*\]/g, ' ').split(/\s+/).filter((w) => /[\p{L}\p{N}]/u.test(w)).length;
}

export interface Turn {
  seconds: number;
  speaker: string;
  speech: string;
}

/** Splits a transcript into turns (paragraphs separated by one blank line). Unparseable paragraphs are null. */
export function parseTurns(text: string): Array<Turn | null> {
  return text.replace(/\r\n/g, '\n').trim().split(/\n[ \t]*\n/).map((para) => {
    const m = TURN.exec(para);
    if (!m) return null;
    return { seconds: +m[1]! * 3600 + +m[2]! * 60 + +m[3]!, speaker: m[4]!, speech: m[5]! };
  });
}

/** True when one speaker turn quotes examples of two different codes of the set (a passage that fits both). */
function exclusiveOverlapShown(setIds: string[], b: DemoBundle): boolean {
  if (!Array.isArray(b.codebook)) return false;
  const examples = b.codebook.filter(isObj).filter((c) => setIds.includes(c.id as string))
    .map((c) => ({ id: c.id as string, quotes: (Array.isArray(c.examples) ? c.examples : []).filter(isStr) }));
  for (const text of Object.values(b.texts)) {
    for (const t of parseTurns(text)) {
      if (!t) continue;
      const hit = new Set(examples.filter((e) => e.quotes.some((q) => t.speech.includes(q))).map((e) => e.id));
      if (hit.size >= 2) return true;
    }
  }
  return false;
}

export function checkDemo(b: DemoBundle): DemoReport {
  const problems: DemoProblem[] = [];
  const bad = (code: string, where: string, message: string) => problems.push({ code, where, message });
  const wordCounts: Record<string, number> = {};

  // study.json
  if (!isObj(b.study)) bad('shape', 'study.json', 'must be an object');
  else {
    for (const k of ['title', 'description', 'researchQuestion', 'ethicsNote']) {
      if (!isStr(b.study[k])) bad('missing-field', 'study.json', `"${k}" must be a non-empty string`);
    }
    if (b.study.mode !== 'standard') bad('bad-value', 'study.json', '"mode" must be "standard"');
    if (!isDate(b.study.retentionUntil)) bad('bad-value', 'study.json', '"retentionUntil" must be a YYYY-MM-DD date');
    const note = String(b.study.ethicsNote ?? '').toLowerCase();
    for (const w of ['invented', 'consent', 'de-identif', 'pseudonym key']) {
      if (!note.includes(w)) bad('ethics-note', 'study.json', `ethicsNote should mention "${w}"`);
    }
  }

  // texts
  const allText = Object.values(b.texts).join('\n\n');
  for (const [file, text] of Object.entries(b.texts)) {
    const where = `texts/${file}`;
    const turns = parseTurns(text);
    let last = -1;
    let words = 0;
    const participants = new Set<string>();
    turns.forEach((t, i) => {
      if (!t) return bad('turn-format', `${where} turn ${i + 1}`, 'expected "[hh:mm:ss] I: ..." or "[hh:mm:ss] P01: ..."');
      if (t.seconds <= last) bad('timestamp-order', `${where} turn ${i + 1}`, 'timestamps must increase');
      if (/\n/.test(t.speech)) bad('turn-format', `${where} turn ${i + 1}`, 'one turn per paragraph (no line breaks inside)');
      last = t.seconds;
      words += countWords(t.speech);
      if (t.speaker !== 'I') participants.add(t.speaker.slice(0, 3));
    });
    wordCounts[file] = words;
    if (words < MIN_WORDS) bad('too-short', where, `${words} words, need at least ${MIN_WORDS}`);
    if (participants.size !== 1) bad('participants', where, `expected one main participant, found ${[...participants].join(', ') || 'none'}`);
  }

  // cases.json
  const caseIds = new Set<string>();
  if (!isObj(b.cases) || !Array.isArray(b.cases.attributes) || !Array.isArray(b.cases.cases)) {
    bad('shape', 'cases.json', 'must be { attributes: [], cases: [] }');
  } else {
    const attrs = new Map<string, Obj>();
    for (const a of b.cases.attributes) {
      if (!isObj(a) || !isStr(a.id) || !isStr(a.name) || !ATTR_TYPES.includes(a.type as string)) {
        bad('attribute', 'cases.json', `bad attribute ${JSON.stringify(a)}`);
        continue;
      }
      if (a.type === 'choice' && !(Array.isArray(a.choices) && a.choices.length > 0)) bad('attribute', 'cases.json', `${a.id}: choice needs choices`);
      attrs.set(a.id, a);
    }
    for (const c of b.cases.cases) {
      if (!isObj(c) || !isStr(c.id) || !isStr(c.name) || !isObj(c.values)) {
        bad('case', 'cases.json', `bad case ${JSON.stringify(c)}`);
        continue;
      }
      if (caseIds.has(c.id)) bad('duplicate-id', 'cases.json', `case ${c.id} twice`);
      caseIds.add(c.id);
      for (const [k, v] of Object.entries(c.values)) {
        const a = attrs.get(k);
        if (!a) { bad('case-value', `cases.json ${c.id}`, `unknown attribute ${k}`); continue; }
        const ok = a.type === 'text' ? typeof v === 'string'
          : a.type === 'number' ? typeof v === 'number' && Number.isFinite(v)
          : a.type === 'boolean' ? typeof v === 'boolean'
          : a.type === 'date' ? isDate(v)
          : (a.choices as unknown[]).includes(v);
        if (!ok) bad('case-value', `cases.json ${c.id}`, `${k}: ${JSON.stringify(v)} is not a valid ${String(a.type)}`);
      }
    }
  }

  // texts/index.json
  const indexed = new Set<string>();
  if (!Array.isArray(b.index)) bad('shape', 'texts/index.json', 'must be an array');
  else {
    for (const e of b.index) {
      if (!isObj(e) || !isStr(e.file) || !isStr(e.title) || !Array.isArray(e.cases)) {
        bad('index-entry', 'texts/index.json', `bad entry ${JSON.stringify(e)}`);
        continue;
      }
      indexed.add(e.file);
      if (!(e.file in b.texts)) bad('missing-text', 'texts/index.json', `${e.file} not found in texts/`);
      for (const c of e.cases) if (!caseIds.has(c as string)) bad('unknown-case', 'texts/index.json', `${e.file}: case ${String(c)} not in cases.json`);
      const main = (e.cases as unknown[]).find((c) => typeof c === 'string' && /^P\d{2}$/.test(c));
      const speakers = new Set(parseTurns(b.texts[e.file] ?? '').map((t) => t?.speaker));
      if (typeof main === 'string' && e.file in b.texts && !speakers.has(main)) bad('unknown-case', 'texts/index.json', `${e.file}: ${main} never speaks`);
      for (const s of speakers) {
        if (s && s !== 'I' && !(e.cases as unknown[]).includes(s)) bad('speaker-not-case', 'texts/index.json', `${e.file}: speaker ${s} is not among its cases`);
      }
    }
  }
  for (const f of Object.keys(b.texts)) if (!indexed.has(f)) bad('unindexed-text', `texts/${f}`, 'not listed in texts/index.json');

  // codebook.json
  const codeIds = new Set<string>();
  if (!Array.isArray(b.codebook)) bad('shape', 'codebook.json', 'must be an array');
  else {
    for (const c of b.codebook) if (isObj(c) && isStr(c.id)) {
      if (codeIds.has(c.id)) bad('duplicate-id', 'codebook.json', `code ${c.id} twice`);
      codeIds.add(c.id);
    }
    for (const c of b.codebook) {
      if (!isObj(c) || !isStr(c.id) || !/^c-[a-z0-9-]+$/.test(c.id)) { bad('code', 'codebook.json', `bad code ${JSON.stringify(c)?.slice(0, 80)}`); continue; }
      const where = `codebook.json ${c.id}`;
      for (const k of ['label', 'brief', 'full', 'inclusion', 'exclusion']) if (!isStr(c[k])) bad('missing-field', where, `"${k}" must be a non-empty string`);
      if (!CODE_TYPES.includes(c.type as string)) bad('bad-value', where, `type must be one of ${CODE_TYPES.join(', ')}`);
      if (!CODE_STATUSES.includes(c.status as string)) bad('bad-value', where, `status must be one of ${CODE_STATUSES.join(', ')}`);
      if (c.parent !== null && !(typeof c.parent === 'string' && codeIds.has(c.parent) && c.parent !== c.id)) bad('bad-parent', where, `parent ${String(c.parent)} is not another code`);
      for (const k of ['examples', 'nearMisses'] as const) {
        const list = c[k];
        if (!Array.isArray(list) || (k === 'examples' && list.length === 0)) { bad('missing-field', where, `"${k}" must be a${k === 'examples' ? ' non-empty' : 'n'} array`); continue; }
        for (const q of list) {
          if (!isStr(q)) bad('quote', where, `${k}: not a string`);
          else if (!allText.includes(q)) bad('quote-not-verbatim', where, `${k}: "${q}" is not in any text`);
        }
      }
    }
    // a parent chain must end: A -> B -> A would make an endless tree
    const parentOf = new Map(b.codebook.filter(isObj).map((c) => [c.id as string, c.parent as string | null]));
    for (const id of parentOf.keys()) {
      const seen = new Set<string>();
      for (let p: string | null | undefined = id; p; p = parentOf.get(p)) {
        if (seen.has(p)) { bad('parent-cycle', `codebook.json ${id}`, 'parent chain loops'); break; }
        seen.add(p);
      }
    }
  }

  // codebook-groups.json
  if (!isObj(b.groups) || !Array.isArray(b.groups.themes) || !Array.isArray(b.groups.exclusiveSets)) {
    bad('shape', 'codebook-groups.json', 'must be { themes: [], exclusiveSets: [] }');
  } else {
    if (b.groups.exclusiveSets.length === 0) bad('no-exclusive-set', 'codebook-groups.json', 'at least one mutually exclusive set');
    for (const [kind, list] of [['themes', b.groups.themes], ['exclusiveSets', b.groups.exclusiveSets]] as const) {
      for (const g of list) {
        if (!isObj(g) || !isStr(g.id) || !isStr(g.label) || !Array.isArray(g.codeIds)) { bad('group', 'codebook-groups.json', `bad ${kind} entry`); continue; }
        for (const id of g.codeIds) if (!codeIds.has(id as string)) bad('unknown-code', `codebook-groups.json ${g.id}`, `code ${String(id)} not in codebook`);
        if (kind === 'exclusiveSets' && g.codeIds.length < 2) bad('group', `codebook-groups.json ${g.id}`, 'an exclusive set needs two or more codes');
        if (kind === 'exclusiveSets' && !exclusiveOverlapShown(g.codeIds as string[], b)) {
          bad('exclusive-demo', `codebook-groups.json ${g.id}`, 'no speaker turn holds examples of two codes of this set, so the demo cannot show the flag');
        }
      }
    }
  }

  // accounts.json
  if (!Array.isArray(b.accounts)) bad('shape', 'accounts.json', 'must be an array');
  else {
    const emails = new Set<string>();
    const roles: string[] = [];
    for (const a of b.accounts) {
      if (!isObj(a) || !isStr(a.email) || !isStr(a.password) || !isStr(a.name) || !ROLES.includes(a.role as (typeof ROLES)[number])) {
        bad('account', 'accounts.json', `bad account ${JSON.stringify(a)}`);
        continue;
      }
      if (!/^[^@\s]+@example\.org$/.test(a.email)) bad('account', 'accounts.json', `${a.email}: use the reserved domain example.org`);
      if (emails.has(a.email)) bad('duplicate-id', 'accounts.json', `${a.email} twice`);
      emails.add(a.email);
      if (a.password.length < 12) bad('account', 'accounts.json', `${a.email}: password shorter than 12`);
      if (!a.password.includes('demo')) bad('account', 'accounts.json', `${a.email}: password should be obviously a demo one`);
      roles.push(a.role as string);
    }
    const need: Record<string, number> = { owner: 1, lead: 1, coder: 2, trainee: 1, observer: 1 };
    for (const [r, n] of Object.entries(need)) {
      if (roles.filter((x) => x === r).length < n) bad('account-roles', 'accounts.json', `need at least ${n} ${r}`);
    }
  }

  // memos.json
  if (!Array.isArray(b.memos)) bad('shape', 'memos.json', 'must be an array');
  else {
    if (b.memos.length < 3 || b.memos.length > 4) bad('memo-count', 'memos.json', `3-4 starter memos, found ${b.memos.length}`);
    for (const m of b.memos) {
      if (!isObj(m) || !isStr(m.title) || !isStr(m.body) || !isObj(m.attachTo)) { bad('memo', 'memos.json', `bad memo ${JSON.stringify(m)?.slice(0, 80)}`); continue; }
      const { kind, ref } = m.attachTo;
      const ok = kind === 'study' ? isStr(ref)
        : kind === 'text' ? typeof ref === 'string' && indexed.has(ref)
        : kind === 'code' ? typeof ref === 'string' && codeIds.has(ref)
        : false;
      if (!ok) bad('memo-target', `memos.json "${m.title}"`, `attachTo ${JSON.stringify(m.attachTo)} does not resolve`);
    }
  }

  return { problems, wordCounts };
}
