/**
 * The picker's list of codes (pure): the whole codebook in its hierarchy (children under their parent,
 * indented), each code with the themes it belongs to; typing filters by label, definition, parent or
 * theme; the person's recently used codes come first.
 */
import type { CodeGroup, CodeView } from '@gloss/model';

export interface ListEntry {
  code: CodeView;
  /** 0 for a top-level code, 1 for its children, … */
  depth: number;
  /** Labels of its ancestors, top first. */
  path: string[];
  themes: string[];
  recent: boolean;
}

const usable = (c: CodeView) => c.status === 'active' || c.status === 'draft';
const norm = (s: string) => s.toLowerCase().replace(/^[“"]/, '');

export function codeList(codes: readonly CodeView[], themes: readonly CodeGroup[], recent: readonly string[], query: string): ListEntry[] {
  const byId = new Map(codes.map((c) => [c.id, c]));
  const children = new Map<string | null, CodeView[]>();
  for (const c of codes) {
    // a parent that is missing (or a cycle left by concurrent moves) puts the code at the top
    const parent = c.parentId !== null && byId.has(c.parentId) && !isAncestor(byId, c.id, c.parentId) ? c.parentId : null;
    children.set(parent, [...(children.get(parent) ?? []), c]);
  }
  const themesOf = new Map<string, string[]>();
  for (const t of themes) for (const id of t.codeIds) themesOf.set(id, [...(themesOf.get(id) ?? []), t.label]);
  const recentRank = new Map(recent.map((id, i) => [id, i]));

  // the tree in codebook order, depth first; a retired parent still holds its usable children
  const tree: ListEntry[] = [];
  const walk = (parent: string | null, depth: number, path: string[]) => {
    for (const c of children.get(parent) ?? []) {
      if (usable(c)) tree.push({ code: c, depth, path, themes: themesOf.get(c.id) ?? [], recent: recentRank.has(c.id) });
      walk(c.id, depth + (usable(c) ? 1 : 0), usable(c) ? [...path, c.label] : path);
    }
  };
  walk(null, 0, []);

  const q = query.trim().toLowerCase();
  const recentFirst = [...tree.filter((e) => e.recent)].sort((a, b) => recentRank.get(a.code.id)! - recentRank.get(b.code.id)!);
  if (!q) return [...recentFirst, ...tree.filter((e) => !e.recent)];
  const starts = tree.filter((e) => norm(e.code.label).startsWith(q));
  const inside = tree.filter((e) => !starts.includes(e) && (
    norm(e.code.label).includes(q) || e.code.briefDefinition.toLowerCase().includes(q) ||
    e.path.some((p) => p.toLowerCase().includes(q)) || e.themes.some((t) => t.toLowerCase().includes(q))));
  const rank = (e: ListEntry) => recentRank.get(e.code.id) ?? Infinity;
  const byRecent = (list: ListEntry[]) => [...list].sort((a, b) => rank(a) - rank(b) || list.indexOf(a) - list.indexOf(b));
  return [...byRecent(starts), ...byRecent(inside)];
}

function isAncestor(byId: Map<string, CodeView>, id: string, of: string): boolean {
  const seen = new Set<string>();
  for (let at: string | null = of; at !== null && !seen.has(at); at = byId.get(at)?.parentId ?? null) {
    if (at === id) return true;
    seen.add(at);
  }
  return false;
}
