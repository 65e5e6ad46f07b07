import { AgreementError } from './errors.js';
import { encodeReliabilityData } from './encode.js';
import type { ReliabilityData, Value } from './types.js';

/** A square contingency table of two coders: rows = first coder, columns = second coder. */
export interface ContingencyTable {
  categories: Value[];
  table: number[][];
}

/** Checks a contingency table: square, non-negative finite cells. Returns it unchanged. */
export function checkTable(table: ReadonlyArray<ReadonlyArray<number>>): ReadonlyArray<ReadonlyArray<number>> {
  if (!Array.isArray(table) || table.length === 0) throw new AgreementError('invalid-input', 'table must be a non-empty array of rows');
  for (const row of table) {
    if (!Array.isArray(row) || row.length !== table.length) throw new AgreementError('not-square', 'table must be square (k rows of k cells)');
    for (const x of row)
      if (typeof x !== 'number' || !Number.isFinite(x) || x < 0) throw new AgreementError('invalid-value', 'table cells must be finite non-negative numbers');
  }
  return table;
}

/**
 * Confusion (contingency) matrix between two coders. Units where either value is missing are left
 * out (listwise deletion). `categories` may fix the labels and their order; otherwise all values seen.
 */
export function confusionMatrix(
  first: ReadonlyArray<Value | null | undefined>,
  second: ReadonlyArray<Value | null | undefined>,
  categories?: ReadonlyArray<Value>,
): ContingencyTable {
  const enc = encodeReliabilityData([first, second], categories ? { order: categories } : {});
  const values = categories ? [...categories] : enc.values;
  const pos = new Map<Value, number>();
  values.forEach((v, i) => pos.set(v, i));
  const map = enc.values.map((v) => pos.get(v)!);
  const k = values.length;
  const table = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  for (let u = 0; u < enc.units; u++) {
    const a = enc.cells[u]!;
    const b = enc.cells[enc.units + u]!;
    if (a >= 0 && b >= 0) table[map[a]!]![map[b]!]! += 1;
  }
  return { categories: values, table };
}

/** Table from reliability data with exactly two coder rows. */
export function tableFromData(data: ReliabilityData, categories?: ReadonlyArray<Value>): ContingencyTable {
  if (!Array.isArray(data) || data.length !== 2) throw new AgreementError('invalid-input', 'two coder rows are needed');
  return confusionMatrix(data[0]!, data[1]!, categories);
}
