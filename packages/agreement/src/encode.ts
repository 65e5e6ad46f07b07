import { AgreementError } from './errors.js';
import type { Level, ReliabilityData, Value } from './types.js';

/**
 * Reliability data with every value mapped once to an integer index into `values`
 * (sorted: numbers ascending, or the caller's order for ordinal strings). Cells are coder-major:
 * `cells[coder * units + unit]`, -1 for missing. Computing on indices keeps the hot loops on typed arrays.
 */
export interface EncodedData {
  coders: number;
  units: number;
  values: Value[];
  cells: Int32Array;
}

export interface EncodeOptions {
  level?: Level;
  /** Explicit order of values (required for ordinal string values). */
  order?: ReadonlyArray<Value>;
}

const SMALL = 1024;

/** Checks that `data` is rows of coders; the units are as many as the longest row has cells. */
export function dataShape(data: ReliabilityData): { coders: number; units: number } {
  if (!Array.isArray(data)) throw new AgreementError('invalid-input', 'reliability data must be an array of coder rows');
  const coders = data.length;
  let units = 0;
  for (const row of data) {
    if (!Array.isArray(row)) throw new AgreementError('invalid-input', 'each coder row must be an array');
    if (row.length > units) units = row.length;
  }
  return { coders, units };
}

export function encodeReliabilityData(data: ReliabilityData, options: EncodeOptions = {}): EncodedData {
  const { coders, units } = dataShape(data);
  const cells = new Int32Array(coders * units).fill(-1);
  const seen = new Map<Value, number>();
  const firstSeen: Value[] = [];
  let numbers = 0;
  let strings = 0;
  // Codes are usually small non-negative integers: index those through an array, not the Map.
  const small = new Int32Array(SMALL).fill(-1);
  for (let c = 0; c < coders; c++) {
    const row = data[c]!;
    const base = c * units;
    // Consecutive equal values are common; skipping the Map lookup for them halves encoding time.
    let lastValue: unknown = undefined;
    let lastIndex = -1;
    for (let u = 0; u < row.length; u++) {
      const v = row[u];
      if (v === null || v === undefined) continue;
      if (v === lastValue) {
        cells[base + u] = lastIndex;
        continue;
      }
      const isSmall = typeof v === 'number' && v >= 0 && v < SMALL && (v | 0) === v;
      let idx: number | undefined = isSmall ? small[v as number]! : seen.get(v);
      if (idx === -1) idx = undefined;
      if (idx === undefined) {
        if (typeof v === 'number') {
          if (!Number.isFinite(v)) throw new AgreementError('invalid-value', `value at coder ${c}, unit ${u} is not a finite number`);
          numbers++;
        } else if (typeof v === 'string') strings++;
        else throw new AgreementError('invalid-value', `value at coder ${c}, unit ${u} must be a number, a string or null`);
        idx = firstSeen.length;
        firstSeen.push(v);
        seen.set(v, idx);
        if (isSmall) small[v as number] = idx;
      }
      cells[base + u] = idx;
      lastValue = v;
      lastIndex = idx;
    }
  }
  const level = options.level ?? 'nominal';
  const values = sortValues(firstSeen, level, options.order, numbers, strings);
  // Remap first-seen indices to sorted indices.
  const remap = new Int32Array(firstSeen.length);
  const rank = new Map<Value, number>();
  values.forEach((v, i) => rank.set(v, i));
  firstSeen.forEach((v, i) => (remap[i] = rank.get(v)!));
  let identity = true;
  for (let i = 0; i < remap.length; i++) if (remap[i] !== i) identity = false;
  if (!identity) for (let i = 0; i < cells.length; i++) if (cells[i]! >= 0) cells[i] = remap[cells[i]!]!;
  return { coders, units, values, cells };
}

function sortValues(vals: Value[], level: Level, order: ReadonlyArray<Value> | undefined, numbers: number, strings: number): Value[] {
  if (order) {
    const pos = new Map<Value, number>();
    order.forEach((v, i) => pos.set(v, i));
    for (const v of vals) if (!pos.has(v)) throw new AgreementError('invalid-value', `value ${JSON.stringify(v)} is not in the given order`);
    return [...vals].sort((a, b) => pos.get(a)! - pos.get(b)!);
  }
  if (numbers > 0 && strings > 0) {
    if (level !== 'nominal') throw new AgreementError('mixed-value-types', `${level} data cannot mix numbers and strings`);
    // Nominal: order is irrelevant to the result; numbers first keeps output stable.
    return [...vals].sort((a, b) => (typeof a === typeof b ? (a < b ? -1 : a > b ? 1 : 0) : typeof a === 'number' ? -1 : 1));
  }
  if (strings > 0) {
    if (level === 'interval' || level === 'ratio') throw new AgreementError('not-numeric', `${level} data needs numeric values`);
    if (level === 'ordinal') throw new AgreementError('ordinal-needs-order', 'ordinal string values need an explicit order');
    return [...vals].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  }
  if (level === 'ratio' && vals.some((v) => (v as number) < 0)) throw new AgreementError('invalid-value', 'ratio data must be non-negative');
  return [...vals].sort((a, b) => (a as number) - (b as number));
}
