/**
 * The round report (issue 8 item 9): what methods papers ask an intercoder-reliability account to
 * state — who coded and how independently, the unit, how much of the data was double-coded, per-code
 * and pooled coefficients with intervals, how many rounds there were, how disagreements were
 * resolved, and what changed in the codebook. Built as JSON for the page; `toMarkdown` and `toCsv`
 * give the downloads. Pure: the route gathers the facts.
 */
import { CSV_BOM, csvRecord } from '@gloss/interchange';

export const REPORT_SOURCES = [
  "O'Connor, C. & Joffe, H. (2020). Intercoder reliability in qualitative research: debates and practical guidelines. International Journal of Qualitative Methods, 19.",
  'MacPhail, C., Khoza, N., Abler, L. & Ranganathan, M. (2016). Process guidelines for establishing intercoder reliability in qualitative studies. Qualitative Research, 16(2), 198-212.',
  'Campbell, J. L., Quincy, C., Osserman, J. & Pedersen, O. K. (2013). Coding in-depth semistructured interviews: problems of unitization and intercoder reliability and agreement. Sociological Methods & Research, 42(3), 294-320.',
];

export const REPORT_CAUTION =
  'This report names the coders and quotes the data. Keep and share it as the study’s ethics approval, consent terms and the data-protection law that applies allow.';

export interface Coef {
  value: number | null;
  ci?: [number, number] | null;
  band?: string;
  reason?: string;
}

export interface RoundReport {
  round: { id: string; number: number; name: string; purpose: string; phase: string; startedAt: string; revealedAt: string | null; closedAt: string | null };
  study: { id: string; title: string; mode: string; roundsSoFar: number };
  coders: Array<{ id: string; name: string; role: string; textsDone: number; segments: number }>;
  independence: string;
  unit: { kind: string; description: string };
  statistic: string;
  doubleCoded: { texts: number; studyTexts: number; words: number; studyWords: number; share: number | null };
  /** null in the reflexive mode (no coefficient is computed). */
  coefficients: {
    method: string;
    interval: string;
    pooled: Coef;
    perCode: Array<{ codeId: string; label: string } & Coef>;
    perCoderPair: Array<{ coders: [string, string] } & Coef>;
  } | null;
  reflexiveNote?: string;
  differences?: number;
  consensus: { segments: number; withReason: number; description: string; items: Array<{ textId: string; codeId: string; label: string; quote: string; reason: string | null }> };
  codebook: { versionId: string | null; changes: Array<{ at: string; by: string; kind: string; codes: string[]; field: string | null; reason: string | null; detail: string | null }> };
  caution: string;
  sources: string[];
}

const UNIT_WORDS: Record<string, string> = {
  turn: 'speaker turn: each (text, code, turn) is a unit, valued 1 when the coder applied the code anywhere in the turn',
  paragraph: 'paragraph: each (text, code, paragraph) is a unit, valued 1 when the coder applied the code anywhere in it',
  sentence: 'sentence: each (text, code, sentence) is a unit, valued 1 when the coder applied the code anywhere in it',
  character: 'character: each (text, code, character) is a unit, valued 1 when a segment of the code covers it',
  span: "free spans: the coders' own segments compared with Krippendorff's unitizing alpha",
};

export const unitDescription = (unit: string) => UNIT_WORDS[unit] ?? unit;

export const INDEPENDENCE =
  'Each participant coded in a layer of their own for this round. Until the reveal the server refused every participant any other person’s layer of the round’s texts, withheld where others pointed in those texts, and served no one’s segments, counts or agreement about them to anyone else; the lead saw progress counts only.';

const fmt = (v: number | null | undefined) => (v === null || v === undefined ? '—' : v.toFixed(3));
const ci = (c: Coef) => (c.ci ? `${fmt(c.ci[0])} – ${fmt(c.ci[1])}` : '—');
const pct = (v: number | null) => (v === null ? '—' : `${(v * 100).toFixed(1)} %`);
const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\r?\n/g, ' ');

export function toMarkdown(r: RoundReport): string {
  const L: string[] = [];
  L.push(`# Round ${r.round.number}: ${cell(r.round.name)}`, '');
  L.push(`Study: ${cell(r.study.title)} (${r.study.mode === 'reflexive' ? 'reflexive mode' : 'coding-reliability mode'}). Round ${r.round.number} of ${r.study.roundsSoFar} so far; phase ${r.round.phase}.`, '');
  if (r.round.purpose) L.push(`Purpose: ${cell(r.round.purpose)}`, '');
  L.push(`Started ${r.round.startedAt}; revealed ${r.round.revealedAt ?? '—'}; closed ${r.round.closedAt ?? '—'}.`, '');
  L.push(`> ${r.caution}`, '');
  L.push('## Coders and their independence', '', r.independence, '', '| coder | role | texts marked done | segments |', '| --- | --- | --- | --- |');
  for (const c of r.coders) L.push(`| ${cell(c.name)} | ${c.role} | ${c.textsDone} | ${c.segments} |`);
  L.push('', '## Unit and data', '', `Unit of comparison: ${r.unit.description}.`, '');
  L.push(`Double-coded: ${r.doubleCoded.texts} of ${r.doubleCoded.studyTexts} texts, ${r.doubleCoded.words} of ${r.doubleCoded.studyWords} words (${pct(r.doubleCoded.share)}).`, '');
  if (r.coefficients) {
    const k = r.coefficients;
    L.push('## Agreement', '', `Statistic: ${r.statistic}. ${k.method}`, '', `Intervals: ${k.interval}`, '');
    L.push('| | value | interval | band |', '| --- | --- | --- | --- |', `| pooled | ${fmt(k.pooled.value)} | ${ci(k.pooled)} | ${k.pooled.band ?? k.pooled.reason ?? ''} |`);
    for (const c of k.perCode) L.push(`| ${cell(c.label || c.codeId)} | ${fmt(c.value)} | ${ci(c)} | ${c.band ?? c.reason ?? ''} |`);
    if (k.perCoderPair.length) {
      L.push('', '| coder pair | value | band |', '| --- | --- | --- |');
      for (const p of k.perCoderPair) L.push(`| ${cell(p.coders.join(' & '))} | ${fmt(p.value)} | ${p.band ?? p.reason ?? ''} |`);
    }
  } else {
    L.push('## Agreement', '', r.reflexiveNote ?? '', '', `Units coded differently: ${r.differences ?? 0}.`);
  }
  L.push('', '## How disagreements were resolved', '', r.consensus.description, '');
  if (r.consensus.items.length) {
    L.push('| code | quote | reason |', '| --- | --- | --- |');
    for (const i of r.consensus.items) L.push(`| ${cell(i.label || i.codeId)} | ${cell(i.quote)} | ${cell(i.reason ?? '')} |`);
  }
  L.push('', '## Codebook changes in this round', '');
  L.push(r.codebook.versionId ? `The codebook in force at the start is kept as a named version (${r.codebook.versionId}).` : 'No codebook version was kept at the start.', '');
  if (r.codebook.changes.length === 0) L.push('No codebook changes were stamped with this round.');
  else {
    L.push('| when | by | change | codes | field | why |', '| --- | --- | --- | --- | --- | --- |');
    for (const c of r.codebook.changes) L.push(`| ${c.at} | ${cell(c.by)} | ${c.kind}${c.detail ? `: ${cell(c.detail)}` : ''} | ${cell(c.codes.join(', '))} | ${c.field ?? ''} | ${cell(c.reason ?? '')} |`);
  }
  L.push('', '---', '', 'What this report states follows the reporting advice in:', '');
  r.sources.forEach((s, i) => L.push(`${i + 1}. ${s}`));
  return L.join('\n') + '\n';
}

export const CSV_COLUMNS = ['section', 'name', 'value', 'ci_low', 'ci_high', 'band', 'detail'] as const;

/** One table (RFC 4180) with a `section` column: round facts, coders, coefficients, consensus, codebook changes, sources. */
export function toCsv(r: RoundReport): string {
  const rows: Array<Array<string | number | null>> = [];
  const add = (section: string, name: string, value: string | number | null, c?: Coef, detail?: string) =>
    rows.push([section, name, value, c?.ci?.[0] ?? null, c?.ci?.[1] ?? null, c?.band ?? c?.reason ?? null, detail ?? null]);
  add('round', 'name', r.round.name);
  add('round', 'number', r.round.number);
  add('round', 'rounds so far', r.study.roundsSoFar);
  add('round', 'purpose', r.round.purpose);
  add('round', 'phase', r.round.phase);
  add('round', 'mode', r.study.mode);
  add('round', 'unit', r.unit.kind, undefined, r.unit.description);
  add('round', 'statistic', r.statistic);
  add('round', 'texts double-coded', r.doubleCoded.texts, undefined, `of ${r.doubleCoded.studyTexts}`);
  add('round', 'words double-coded', r.doubleCoded.words, undefined, `of ${r.doubleCoded.studyWords}`);
  add('round', 'share double-coded (words)', r.doubleCoded.share);
  add('round', 'independence', null, undefined, r.independence);
  for (const c of r.coders) add('coder', c.name, c.segments, undefined, `${c.role}; texts done ${c.textsDone}`);
  if (r.coefficients) {
    add('coefficient', 'pooled', r.coefficients.pooled.value, r.coefficients.pooled, r.coefficients.method);
    for (const c of r.coefficients.perCode) add('coefficient', `code: ${c.label || c.codeId}`, c.value, c, c.codeId);
    for (const p of r.coefficients.perCoderPair) add('coefficient', `pair: ${p.coders.join(' & ')}`, p.value, p);
  } else add('coefficient', 'none (reflexive mode)', null, undefined, r.reflexiveNote);
  add('consensus', 'segments', r.consensus.segments, undefined, r.consensus.description);
  add('consensus', 'with a reason', r.consensus.withReason);
  for (const i of r.consensus.items) add('consensus', i.label || i.codeId, i.quote, undefined, i.reason ?? '');
  for (const c of r.codebook.changes) add('codebook-change', c.kind, c.codes.join(' '), undefined, [c.at, c.by, c.field, c.detail, c.reason].filter(Boolean).join('; '));
  add('note', 'caution', null, undefined, r.caution);
  r.sources.forEach((s, i) => add('note', `source ${i + 1}`, null, undefined, s));
  return CSV_BOM + csvRecord([...CSV_COLUMNS]) + rows.map((row) => csvRecord(row)).join('');
}
