/**
 * The agreement report behind the endpoint (DESIGN §5): pooled, per code, per text, per coder pair.
 * Krippendorff's alpha and free spans come from packages/agreement's study report (binary alpha per
 * code over every (code, unit); unitizing alpha for spans; bootstrap by resampling texts). The other
 * coefficients are computed from the same presence/absence data (data.ts) with the package's
 * functions. Every block carries `value` (the asked-for statistic); the package's other figures go in `detail`.
 */
import { agreementReport as studyReport, type BinaryAgreement } from '@gloss/agreement';
import { buildMatrix, select, type TextInput } from './data.js';
import { coefficient, type Coefficient, type Statistic } from './statistics.js';
import { unitizingOver } from './unitizing.js';
import type { UnitKind } from './units.js';

export interface ReportInput {
  unit: UnitKind;
  statistic: Statistic;
  texts: TextInput[];
  codes: string[];
  coders: string[];
  bootstrap?: { replicates: number; seed: number; scheme?: 'texts' | 'units' };
}

type Block = Coefficient;

export interface ServerReport {
  statistic: Statistic | 'unitizing-alpha';
  pooled: Block;
  perCode: Array<{ codeId: string; result: Block }>;
  perText: Array<{ textId: string; result: Block }>;
  perCoderPair: Array<{ coders: [string, string]; result: Block }>;
  bootstrap?: unknown;
}

const pairs = <T>(xs: readonly T[]): Array<[T, T]> => xs.flatMap((a, i) => xs.slice(i + 1).map((b) => [a, b] as [T, T]));

function fromAlpha(b: BinaryAgreement): Block {
  const { alpha, reason, band, ci, ...rest } = b;
  return {
    statistic: 'krippendorff-alpha',
    value: alpha,
    ...(reason ? { reason } : {}),
    ...(band ? { band } : {}),
    ...(ci !== undefined ? { ci } : {}),
    detail: { level: 'nominal', ...rest },
  };
}

export function agreementReport(input: ReportInput): ServerReport {
  const { texts, codes, coders, unit } = input;
  const study = { texts, codes, coders };
  if (unit === 'span') {
    const r = studyReport(study, { unit: 'character', unitizing: true });
    const u = (x: { value: number | null; reason?: string } | undefined): Block => ({
      statistic: 'unitizing-alpha',
      value: x?.value ?? null,
      ...(x && x.value === null ? { reason: x.reason ?? 'no-variation' } : {}),
    });
    return {
      statistic: 'unitizing-alpha',
      pooled: unitizingOver(texts, codes, coders),
      perCode: r.perCode.map((c) => ({ codeId: c.codeId, result: c.unitizing ? u(c.unitizing) : { ...u(undefined), reason: 'texts-with-different-coders' } })),
      perText: r.perText.map((t) => ({ textId: t.textId, result: u(t.unitizing) })),
      perCoderPair: pairs(coders).map((p) => ({ coders: p, result: unitizingOver(texts, codes, p) })),
    };
  }
  const scale = unit === 'character' ? 'character' : 'fixed';
  if (input.statistic === 'krippendorff-alpha') {
    const r = studyReport(study, { unit: scale, ...(input.bootstrap ? { bootstrap: { scheme: 'texts' as const, ...input.bootstrap } } : {}) });
    return {
      statistic: 'krippendorff-alpha',
      pooled: fromAlpha(r.pooled),
      perCode: r.perCode.map(({ codeId, ...b }) => ({ codeId, result: fromAlpha(b) })),
      perText: r.perText.map(({ textId, coders: _c, ...b }) => ({ textId, result: fromAlpha(b) })),
      perCoderPair: r.perCoderPair.map(({ coders: pair, kappa, table, perCode, ...b }) => {
        const result = fromAlpha(b);
        return { coders: pair, result: { ...result, detail: { ...result.detail, cohenKappa: kappa.value, table, perCode } } };
      }),
      ...(r.bootstrap ? { bootstrap: r.bootstrap } : {}),
    };
  }
  const m = buildMatrix(texts, codes, coders, scale);
  const stat = (sub: typeof m): Block => coefficient(input.statistic, sub.rows);
  return {
    statistic: input.statistic,
    pooled: stat(m),
    perCode: codes.map((codeId) => ({ codeId, result: stat(select(m, (c) => c.codeId === codeId)) })),
    perText: texts.map((t) => ({ textId: t.textId, result: stat(select(m, (c) => c.textId === t.textId)) })),
    perCoderPair: pairs(coders).map((p) => ({ coders: p, result: stat(select(m, () => true, p)) })),
  };
}
