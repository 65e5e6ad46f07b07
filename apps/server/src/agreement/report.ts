/**
 * The agreement report (DESIGN §5), pure: pooled over everything asked for, per code, per text and
 * per coder pair. Pooled figures stack the (text, code, unit) columns of presence/absence data into
 * one reliability table; free spans stack the texts' continuums per code instead.
 */
import { buildMatrix, select, type Matrix, type TextInput } from './data.js';
import { spanCoefficient } from './spans.js';
import { coefficient, type Coefficient, type StatOptions, type Statistic } from './statistics.js';
import type { UnitKind } from './units.js';

export interface ReportInput {
  unit: UnitKind;
  statistic: Statistic;
  texts: TextInput[];
  codes: string[];
  coders: string[];
  options?: StatOptions;
}

export interface AgreementReport {
  pooled: Coefficient;
  perCode: Array<{ codeId: string; result: Coefficient }>;
  perText: Array<{ textId: string; result: Coefficient }>;
  perCoderPair: Array<{ coders: [string, string]; result: Coefficient }>;
}

const pairs = <T>(xs: readonly T[]): Array<[T, T]> => xs.flatMap((a, i) => xs.slice(i + 1).map((b) => [a, b] as [T, T]));

export function agreementReport(input: ReportInput): AgreementReport {
  const { texts, codes, coders } = input;
  if (input.unit === 'span') {
    return {
      pooled: spanCoefficient(texts, codes, coders),
      perCode: codes.map((codeId) => ({ codeId, result: spanCoefficient(texts, [codeId], coders) })),
      perText: texts.map((t) => ({ textId: t.textId, result: spanCoefficient([t], codes, coders) })),
      perCoderPair: pairs(coders).map((p) => ({ coders: p, result: spanCoefficient(texts, codes, p) })),
    };
  }
  const m: Matrix = buildMatrix(texts, codes, coders);
  const stat = (sub: Matrix, withBootstrap: boolean) =>
    coefficient(input.statistic, sub.rows, withBootstrap && input.options ? input.options : {});
  return {
    pooled: stat(m, true),
    perCode: codes.map((codeId) => ({ codeId, result: stat(select(m, (c) => c.codeId === codeId), true) })),
    perText: texts.map((t) => ({ textId: t.textId, result: stat(select(m, (c) => c.textId === t.textId), false) })),
    perCoderPair: pairs(coders).map((p) => ({ coders: p, result: stat(select(m, () => true, p), false) })),
  };
}
