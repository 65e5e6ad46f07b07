/**
 * Reliability data (coders x units) for the coefficients the study report does not carry (Cohen's
 * kappa over all codes, Fleiss' kappa, Scott's pi, percent agreement), built with packages/agreement's
 * adapters: each (text, code, unit) column holds 1 when the coder applied the code there, 0 when not
 * (any shared character; adapters.ts), and is missing (null) for a coder not counted on that text (coders.ts).
 */
import { characterData, fixedUnitData, type Cell, type CodedText } from '@gloss/agreement';

/** A text as the server hands it to agreement: the package's CodedText plus its words (for quotes). */
export interface TextInput extends CodedText {
  text: string;
  /** Those counted as coders of this text (agreement/coders.ts); a counted coder with no segment there has every code absent. */
  coders: string[];
}

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

export function buildMatrix(texts: readonly TextInput[], codes: readonly string[], coders: readonly string[], unit: 'fixed' | 'character'): Matrix {
  const columns: Column[] = [];
  const rows: Cell[][] = coders.map(() => []);
  for (const t of texts) {
    const own = t.coders.filter((c) => coders.includes(c));
    for (const codeId of codes) {
      const data = unit === 'character' ? characterData(t, codeId, own) : fixedUnitData(t, codeId, own);
      const width = unit === 'character' ? t.textLength : t.units!.length;
      for (let u = 0; u < width; u++) columns.push({ textId: t.textId, codeId, unit: u });
      coders.forEach((c, ci) => {
        const at = own.indexOf(c);
        const target = rows[ci]!;
        if (at < 0) for (let u = 0; u < width; u++) target.push(null);
        else for (const v of data[at]!) target.push(v);
      });
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
