/**
 * The codebook as Markdown (for reading and printing) and as CSV (one record per code), each with
 * every field of the structured entry (MacQueen, McLellan, Kay & Milstein 1998; types after
 * DeCuir-Gunby, Marshall & McCulloch 2011): label, path, brief and full definition, when to use, when
 * not to use, examples, near-misses, type, status, colour, merged into, in vivo, the sets and themes the
 * code belongs to, and its change history (who, when, what, why, which round).
 */
import { CSV_BOM, csvRecord } from './csv.js';
import { codePaths, parentsFirst, type ExChange, type ExCode, type ExExample, type StudyFrame } from './study-data.js';

type Frame = Pick<StudyFrame, 'title' | 'codes' | 'groups' | 'coders'>;

function who(frame: Frame, id: string): string {
  return frame.coders.find((c) => c.id === id)?.name ?? id;
}

function changeLine(frame: Frame, h: ExChange): string {
  const parts = [new Date(h.at).toISOString(), who(frame, h.by), h.kind + (h.field ? ` (${h.field})` : '')];
  if (h.detail) parts.push(h.detail);
  if (h.reason) parts.push(`why: ${h.reason}`);
  parts.push(`round ${h.round}`);
  return parts.join(' — ');
}

function groupsOf(frame: Frame, code: ExCode, kind: 'exclusive' | 'theme'): string[] {
  return frame.groups.filter((g) => g.kind === kind && g.codeIds.includes(code.id)).map((g) => g.label);
}

const quoteList = (xs: ExExample[]) => xs.map((e) => e.quote);

/** Markdown: one section per code, children after their parent, headings nested by depth (to h6). */
export function codebookMarkdown(frame: Frame): string {
  const paths = codePaths(frame.codes);
  const byId = new Map(frame.codes.map((c) => [c.id, c]));
  const depth = (c: ExCode) => {
    let d = 0;
    for (let p = c.parentId, seen = new Set<string>(); p !== null && byId.has(p) && !seen.has(p); p = byId.get(p)!.parentId) {
      seen.add(p);
      d++;
    }
    return d;
  };
  const lines: string[] = [`# Codebook: ${frame.title}`, '', `${frame.codes.length} codes. Exported ${new Date().toISOString()}.`, ''];
  const field = (name: string, value: string) => {
    lines.push(`**${name}:**${value.trim() ? '' : ' —'}`);
    if (value.trim()) lines.push('', ...value.trim().split('\n').map((l) => l), '');
    else lines.push('');
  };
  for (const c of preorder(frame.codes)) {
    lines.push(`${'#'.repeat(Math.min(6, 2 + depth(c)))} ${c.label}`, '');
    lines.push(`- Path: ${paths.get(c.id)}`, `- Id: \`${c.id}\``, `- Type: ${c.type}`, `- Status: ${c.status}${c.mergedInto ? ` (merged into ${paths.get(c.mergedInto) ?? c.mergedInto})` : ''}`);
    lines.push(`- Colour: ${c.colour}`, `- In vivo: ${c.inVivo ? 'yes' : 'no'}`);
    const ex = groupsOf(frame, c, 'exclusive');
    const th = groupsOf(frame, c, 'theme');
    if (ex.length) lines.push(`- Mutually exclusive sets: ${ex.join(', ')}`);
    if (th.length) lines.push(`- Themes: ${th.join(', ')}`);
    lines.push('');
    field('Brief definition', c.briefDefinition);
    field('Full definition', c.fullDefinition);
    field('When to use', c.inclusion);
    field('When not to use', c.exclusion);
    lines.push('**Examples:**', '', ...(c.examples.length ? quoteList(c.examples).map((q) => `> ${q.replace(/\n/g, ' ')}\n`) : ['—', '']));
    lines.push('**Near-misses:**', '', ...(c.nearMisses.length ? quoteList(c.nearMisses).map((q) => `> ${q.replace(/\n/g, ' ')}\n`) : ['—', '']));
    lines.push('**History:**', '', ...(c.history.length ? c.history.map((h) => `- ${changeLine(frame, h)}`) : ['—']), '');
  }
  return lines.join('\n');
}

function preorder(codes: readonly ExCode[]): ExCode[] {
  const ordered = parentsFirst(codes);
  const ids = new Set(ordered.map((c) => c.id));
  const kids = new Map<string | null, ExCode[]>();
  for (const c of ordered) {
    const p = c.parentId !== null && ids.has(c.parentId) ? c.parentId : null;
    kids.set(p, [...(kids.get(p) ?? []), c]);
  }
  const out: ExCode[] = [];
  const seen = new Set<string>();
  const walk = (p: string | null) => {
    for (const c of kids.get(p) ?? []) {
      if (seen.has(c.id)) continue;
      seen.add(c.id);
      out.push(c);
      walk(c.id);
    }
  };
  walk(null);
  for (const c of ordered) if (!seen.has(c.id)) out.push(c); // codes caught in a cycle
  return out;
}

export const CODEBOOK_COLUMNS = [
  'code_id',
  'label',
  'path',
  'parent_id',
  'type',
  'status',
  'merged_into',
  'colour',
  'in_vivo',
  'brief_definition',
  'full_definition',
  'when_to_use',
  'when_not_to_use',
  'examples',
  'near_misses',
  'mutually_exclusive_sets',
  'themes',
  'created_at',
  'history',
] as const;

/** CSV: one record per code; lists (examples, history) one item per line inside their field. */
export function codebookCsv(frame: Frame, opts: { bom?: boolean } = {}): string {
  const paths = codePaths(frame.codes);
  let out = (opts.bom === false ? '' : CSV_BOM) + csvRecord([...CODEBOOK_COLUMNS]);
  for (const c of preorder(frame.codes)) {
    out += csvRecord([
      c.id,
      c.label,
      paths.get(c.id),
      c.parentId ?? '',
      c.type,
      c.status,
      c.mergedInto ?? '',
      c.colour,
      c.inVivo ? 'yes' : 'no',
      c.briefDefinition,
      c.fullDefinition,
      c.inclusion,
      c.exclusion,
      quoteList(c.examples).join('\n'),
      quoteList(c.nearMisses).join('\n'),
      groupsOf(frame, c, 'exclusive').join('; '),
      groupsOf(frame, c, 'theme').join('; '),
      new Date(c.createdAt).toISOString(),
      c.history.map((h) => changeLine(frame, h)).join('\n'),
    ]);
  }
  return out;
}
