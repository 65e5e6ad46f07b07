/**
 * The analysis tables, pure: rows of segments in, counts out. Each cell also says how to find the
 * words behind it (a retrieval filter), so the web app can drill down from any cell.
 *
 * - Co-occurrence by overlap: cell (a, b) counts pairs of a segment of a and a segment of b on the same
 *   text whose words overlap (at least one character in common); the diagonal counts a's segments.
 * - Co-occurrence by unit: cell (a, b) counts speaker turns holding a segment of a and one of b (a
 *   segment belongs to the turn it starts in); the diagonal counts turns holding a.
 * - Code by attribute: cell (code, value) counts the CASES with that value having at least one segment
 *   of the code in their texts (default), or the segments (on request). Frequency is not importance.
 * - Case by code: cell (case, code) counts the code's segments in the case's texts.
 */
export interface SegmentFact {
  id: string;
  textId: string;
  codeId: string;
  coderId: string | null;
  start: number;
  end: number;
  turnIndex: number | null;
}

export interface Matrix {
  rows: string[];
  cols: string[];
  /** cells[r][c] */
  cells: number[][];
}

function blank(rows: string[], cols: string[]): Matrix {
  return { rows, cols, cells: rows.map(() => cols.map(() => 0)) };
}

export function cooccurrence(segments: readonly SegmentFact[], codeIds: readonly string[], mode: 'overlap' | 'unit'): Matrix {
  const m = blank([...codeIds], [...codeIds]);
  const at = new Map(codeIds.map((c, i) => [c, i]));
  const byText = new Map<string, SegmentFact[]>();
  for (const s of segments) if (at.has(s.codeId) && s.end > s.start) byText.set(s.textId, [...(byText.get(s.textId) ?? []), s]);
  if (mode === 'overlap') {
    for (const list of byText.values()) {
      list.sort((a, b) => a.start - b.start);
      for (let i = 0; i < list.length; i++) {
        const a = list[i]!;
        const ai = at.get(a.codeId)!;
        m.cells[ai]![ai]!++;
        for (let j = i + 1; j < list.length && list[j]!.start < a.end; j++) {
          const b = list[j]!;
          if (b.codeId === a.codeId) continue;
          const bi = at.get(b.codeId)!;
          m.cells[ai]![bi]!++;
          m.cells[bi]![ai]!++;
        }
      }
    }
  } else {
    for (const [textId, list] of byText) {
      const units = new Map<number, Set<number>>();
      for (const s of list) {
        if (s.turnIndex === null) continue;
        let u = units.get(s.turnIndex);
        if (!u) units.set(s.turnIndex, (u = new Set()));
        u.add(at.get(s.codeId)!);
      }
      void textId;
      for (const codes of units.values()) for (const a of codes) for (const b of codes) m.cells[a]![b]!++;
    }
  }
  return m;
}

export interface CaseFact {
  id: string;
  textIds: string[];
  values: Record<string, unknown>;
}

/** Columns are the attribute's values as text ('' = no value), in the given order. */
export function codeByAttribute(segments: readonly SegmentFact[], cases: readonly CaseFact[], codeIds: readonly string[], attributeId: string, values: readonly string[], count: 'cases' | 'segments'): Matrix & { casesPerValue: number[] } {
  const m = blank([...codeIds], [...values]);
  const col = new Map(values.map((v, i) => [v, i]));
  const row = new Map(codeIds.map((c, i) => [c, i]));
  const valueOf = (c: CaseFact) => {
    const v = c.values[attributeId];
    return v === null || v === undefined ? '' : String(v);
  };
  const casesOfText = new Map<string, CaseFact[]>();
  for (const c of cases) for (const t of c.textIds) casesOfText.set(t, [...(casesOfText.get(t) ?? []), c]);
  if (count === 'segments') {
    for (const s of segments) {
      const r = row.get(s.codeId);
      if (r === undefined) continue;
      // a segment of a text shared by several cases counts once per distinct value
      const vals = new Set((casesOfText.get(s.textId) ?? []).map(valueOf));
      for (const v of vals) if (col.has(v)) m.cells[r]![col.get(v)!]!++;
    }
  } else {
    const seen = new Set<string>();
    for (const s of segments) {
      const r = row.get(s.codeId);
      if (r === undefined) continue;
      for (const c of casesOfText.get(s.textId) ?? []) {
        const key = `${s.codeId}\u0000${c.id}`;
        if (seen.has(key)) continue;
        seen.add(key);
        const k = col.get(valueOf(c));
        if (k !== undefined) m.cells[r]![k]!++;
      }
    }
  }
  const casesPerValue = values.map((v) => cases.filter((c) => valueOf(c) === v).length);
  return { ...m, casesPerValue };
}

export function caseByCode(segments: readonly SegmentFact[], cases: readonly CaseFact[], codeIds: readonly string[]): Matrix {
  const m = blank(cases.map((c) => c.id), [...codeIds]);
  const col = new Map(codeIds.map((c, i) => [c, i]));
  cases.forEach((c, r) => {
    const texts = new Set(c.textIds);
    for (const s of segments) {
      const k = col.get(s.codeId);
      if (k !== undefined && texts.has(s.textId)) m.cells[r]![k]!++;
    }
  });
  return m;
}

/** Segment ids of code `a` that co-occur with code `b` (the words behind a co-occurrence cell). */
export function cooccurringSegments(segments: readonly SegmentFact[], a: string, b: string, mode: 'overlap' | 'unit'): Set<string> {
  const out = new Set<string>();
  const bs = segments.filter((s) => s.codeId === b);
  for (const s of segments) {
    if (s.codeId !== a) continue;
    const hit = bs.some((t) =>
      t.textId === s.textId && t.id !== s.id && (mode === 'overlap' ? t.start < s.end && s.start < t.end : t.turnIndex !== null && t.turnIndex === s.turnIndex),
    );
    if (hit) out.add(s.id);
  }
  return out;
}
