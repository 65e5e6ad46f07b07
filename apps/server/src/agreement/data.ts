/**
 * From coded segments to reliability data (coders x units), pure. Each code is judged on its own:
 * a coder's value for a (code, unit) pair is 1 when one of their segments with that code overlaps the
 * unit and 0 when none does; missing (null) when the coder has no layer on that text. This is the
 * usual presence/absence coding of multi-code qualitative data (common practice). Free spans go to
 * unitizing alpha instead (spans.ts).
 */
import type { Cell } from '@gloss/agreement';
import type { Unit } from './units.js';

export interface CodedSpan {
  codeId: string;
  start: number;
  end: number;
}

export interface TextInput {
  textId: string;
  /** The current text (its length is the continuum for spans). */
  text: string;
  units: Unit[];
  /** coderId -> that coder's segments on the text; a coder absent here has no layer on it. */
  layers: Map<string, CodedSpan[]>;
}

/** One column of reliability data: which text, which code, which unit. */
export interface Column {
  textId: string;
  codeId: string;
  unit: number;
}

export interface Matrix {
  coders: string[];
  columns: Column[];
  /** rows[coder][column] */
  rows: Cell[][];
}

/** Marks, per code, which units each segment overlaps (segments of zero length mark nothing). */
function presence(units: readonly Unit[], spans: readonly CodedSpan[], codeId: string): Uint8Array {
  const hit = new Uint8Array(units.length);
  const mine = spans.filter((s) => s.codeId === codeId && s.end > s.start);
  if (mine.length === 0) return hit;
  // Units are sorted and disjoint: binary-search the first unit ending after the span starts.
  for (const s of mine) {
    let lo = 0;
    let hi = units.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (units[mid]!.end <= s.start) lo = mid + 1;
      else hi = mid;
    }
    for (let u = lo; u < units.length && units[u]!.start < s.end; u++) hit[u] = 1;
  }
  return hit;
}

export function buildMatrix(texts: readonly TextInput[], codes: readonly string[], coders: readonly string[]): Matrix {
  const columns: Column[] = [];
  const rows: Cell[][] = coders.map(() => []);
  for (const t of texts) {
    for (const codeId of codes) {
      const marks = coders.map((c) => {
        const spans = t.layers.get(c);
        return spans ? presence(t.units, spans, codeId) : null;
      });
      for (let u = 0; u < t.units.length; u++) {
        columns.push({ textId: t.textId, codeId, unit: u });
        coders.forEach((_, ci) => rows[ci]!.push(marks[ci] ? marks[ci]![u]! : null));
      }
    }
  }
  return { coders: [...coders], columns, rows };
}

/** The sub-matrix of the columns that pass `keep` and the given coders. */
export function select(m: Matrix, keep: (c: Column) => boolean, coders: readonly string[] = m.coders): Matrix {
  const idx: number[] = [];
  m.columns.forEach((c, i) => {
    if (keep(c)) idx.push(i);
  });
  const rowIdx = coders.map((c) => m.coders.indexOf(c));
  return { coders: [...coders], columns: idx.map((i) => m.columns[i]!), rows: rowIdx.map((r) => idx.map((i) => m.rows[r]![i]!)) };
}
