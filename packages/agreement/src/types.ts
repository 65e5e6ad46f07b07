/** A coded value: a category label or a number. `null`/`undefined` mark a missing value. */
export type Value = number | string;
export type Cell = Value | null | undefined;
/** Reliability data: one row per coder, one column per unit. Rows may be ragged (missing at the end). */
export type ReliabilityData = ReadonlyArray<ReadonlyArray<Cell>>;

/** Why a coefficient has no value. Reported instead of NaN. */
export type UndefinedReason =
  | 'no-pairable-values' // fewer than two values in any unit, or no units
  | 'no-variation' // one category only: expected disagreement is zero
  | 'perfect-chance-agreement' // p_e = 1 for kappa-type coefficients
  | 'too-few-categories'; // e.g. cu-alpha needs two valued categories

/** A coefficient that may be undefined: `value === null` always comes with a `reason`. */
export interface Estimate {
  value: number | null;
  reason?: UndefinedReason;
}

export type Level = 'nominal' | 'ordinal' | 'interval' | 'ratio';
