import { krippendorffBand, type KrippendorffBand } from './bands.js';
import { checkCodedText, type CodedSegment, type CodedText } from './coded-text.js';
import { unitizingSpans } from './adapters.js';
import { AgreementError } from './errors.js';
import { cohenKappa, type KappaResult } from './kappa.js';
import { mulberry32, quantile } from './random.js';
import { addPattern, binaryFromTriple, characterPatterns, fixedUnitPatterns, popcount } from './tallies.js';
import type { UndefinedReason } from './types.js';
import { unitizingAlpha1995 } from './unitizing-1995.js';

export interface StudyData {
  texts: ReadonlyArray<CodedText>;
  /** codes to report, in this order; default: every code used, in order of first use. Segments with other codes are ignored and counted. */
  codes?: ReadonlyArray<string>;
  /** coders; default: every coder named by a text or a segment. A text's own `coders` overrides this for that text. */
  coders?: ReadonlyArray<string>;
}

export interface ReportOptions {
  /** 'fixed': the texts' units (speaker turns, paragraphs...); 'character': every character. Default: fixed when every text has units. */
  unit?: 'fixed' | 'character';
  bootstrap?:
    | false
    | {
        replicates?: number;
        seed?: number;
        confidence?: number;
        /** 'texts' (default): resample whole texts, keeping dependence within a text; 'units': resample fixed units */
        scheme?: 'texts' | 'units';
      };
  /** also compute unitizing alpha (Krippendorff 1995/2004) per code and text */
  unitizing?: boolean;
}

/** Binary (code present / absent) agreement on a set of units, all coders pooled as in nominal alpha. */
export interface BinaryAgreement {
  alpha: number | null;
  reason?: UndefinedReason;
  D_o: number | null;
  D_e: number | null;
  /** pairable-values convention (1 - D_o) */
  percentAgreement: number | null;
  /** pairable values (weighted by run length at character level) */
  n: number;
  band?: KrippendorffBand;
  ci?: [number, number] | null;
}

export interface UnitizingSummary {
  value: number | null;
  reason?: UndefinedReason;
}

export interface CodeReport extends BinaryAgreement {
  codeId: string;
  unitizing?: UnitizingSummary;
}

export interface TextReport extends BinaryAgreement {
  textId: string;
  coders: string[];
  unitizing?: UnitizingSummary & { perCode: Array<UnitizingSummary & { codeId: string }> };
}

export interface PairReport extends BinaryAgreement {
  coders: [string, string];
  /** Cohen's kappa on the pooled 2x2 table (rows: first coder; absent, present) */
  kappa: KappaResult;
  /** pooled 2x2 table: [[absent/absent, absent/present], [present/absent, present/present]] */
  table: [[number, number], [number, number]];
  perCode: Array<{
    codeId: string;
    alpha: number | null;
    reason?: UndefinedReason;
    kappa: number | null;
    kappaReason?: UndefinedReason;
    percentAgreement: number | null;
  }>;
}

export interface AgreementReport {
  unit: 'fixed' | 'character';
  coders: string[];
  codes: string[];
  texts: number;
  /** segments whose code is not in `codes` */
  ignoredSegments: number;
  /** all codes and texts pooled: every (code, unit) is one binary unit */
  pooled: BinaryAgreement;
  perCode: CodeReport[];
  perText: TextReport[];
  perCoderPair: PairReport[];
  bootstrap?: { scheme: 'texts' | 'units'; replicates: number; seed: number; confidence: number; method: 'percentile (type 7)' };
}

const MAX_CODERS = 30;

/**
 * Agreement report for a study: per code, per text, per coder pair and pooled, with optional bootstrap
 * intervals (per code and pooled) and unitizing alpha. Takes plain data; a round is reported by passing
 * that round's texts and segments. Presence rule for fixed units: any shared character (see adapters.ts).
 */
export function agreementReport(study: StudyData, options: ReportOptions = {}): AgreementReport {
  if (!study || !Array.isArray(study.texts)) throw new AgreementError('invalid-input', 'study.texts must be an array');
  for (const t of study.texts) checkCodedText(t);
  for (const list of [study.coders, study.codes, ...study.texts.map((t) => t.coders)])
    if (list !== undefined && (!Array.isArray(list) || list.some((x) => typeof x !== 'string')))
      throw new AgreementError('invalid-input', 'coders and codes must be arrays of strings');
  const coders = study.coders
    ? [...study.coders]
    : [...new Set(study.texts.flatMap((t) => [...(t.coders ?? []), ...t.segments.map((s: CodedSegment) => s.coderId)]))];
  if (coders.length > MAX_CODERS) throw new AgreementError('too-many-coders', `at most ${MAX_CODERS} coders per report`);
  const bit = new Map(coders.map((c, i) => [c, 1 << i]));
  const codes = study.codes ? [...study.codes] : [...new Set(study.texts.flatMap((t) => t.segments.map((s: CodedSegment) => s.codeId)))];
  const codeIndex = new Map(codes.map((c, i) => [c, i]));
  const C = codes.length;
  const unit = options.unit ?? (study.texts.length > 0 && study.texts.every((t) => t.units) ? 'fixed' : 'character');
  if (unit === 'fixed') for (const t of study.texts) if (!t.units) throw new AgreementError('invalid-input', `text ${t.textId} has no units`);
  const boot = options.bootstrap ? { replicates: 1000, seed: 1, confidence: 0.95, scheme: 'texts' as const, ...options.bootstrap } : null;
  if (boot) {
    if (!Number.isInteger(boot.replicates) || boot.replicates < 1) throw new AgreementError('invalid-input', 'bootstrap.replicates must be a positive integer');
    if (!(boot.confidence > 0 && boot.confidence < 1)) throw new AgreementError('invalid-input', 'bootstrap.confidence must lie strictly between 0 and 1');
    if (boot.scheme === 'units' && unit !== 'fixed') throw new AgreementError('invalid-input', "bootstrap scheme 'units' needs fixed units");
  }

  const pairs: Array<[number, number]> = [];
  for (let a = 0; a < coders.length; a++) for (let b = a + 1; b < coders.length; b++) pairs.push([a, b]);
  const pairTables = new Float64Array(pairs.length * C * 4);
  const S = (C + 1) * 3; // per cluster: one triple per code, then the pooled triple
  const perTextTriples: Float64Array[] = [];
  const unitClusters: Float64Array[] = [];
  let ignoredSegments = 0;

  for (const text of study.texts) {
    for (const s of text.segments) if (!codeIndex.has(s.codeId)) ignoredSegments++;
    for (const s of text.segments)
      if (!bit.has(s.coderId)) throw new AgreementError('invalid-input', `text ${text.textId}: segment by ${s.coderId}, who is not among the coders`);
    const own = text.coders ?? coders;
    let T = 0;
    for (const c of own) {
      const b = bit.get(c);
      if (b === undefined) throw new AgreementError('invalid-input', `text ${text.textId}: coder ${c} is not among the study's coders`);
      T |= b;
    }
    const m = popcount(T);
    const acc = new Float64Array(S);
    perTextTriples.push(acc);
    if (m < 2) continue;
    const textPairs = pairs.map(([a, b], i) => [i, 1 << a, 1 << b] as const).filter(([, ba, bb]) => (T & ba) !== 0 && (T & bb) !== 0);
    const visit = (c: number, mask: number, w: number) => {
      addPattern(acc, c * 3, mask, T, m, w);
      for (const [i, ba, bb] of textPairs) {
        const at = (i * C + c) * 4 + ((mask & ba ? 2 : 0) | (mask & bb ? 1 : 0));
        pairTables[at] = pairTables[at]! + w;
      }
    };
    if (unit === 'fixed') {
      const masks = fixedUnitPatterns(text, codeIndex, bit, C);
      const U = text.units!.length;
      for (let c = 0; c < C; c++) for (let u = 0; u < U; u++) visit(c, masks[c]![u]!, 1);
      if (boot?.scheme === 'units')
        for (let u = 0; u < U; u++) {
          const cl = new Float64Array(S);
          for (let c = 0; c < C; c++) addPattern(cl, c * 3, masks[c]![u]!, T, m, 1);
          poolInto(cl, C);
          unitClusters.push(cl);
        }
    } else {
      const tallies = characterPatterns(text, codeIndex, bit, C, coders.length);
      for (let c = 0; c < C; c++) {
        const t = tallies[c]!;
        for (let i = 0; i < t.masks.length; i++) visit(c, t.masks[i]!, t.weights[i]!);
      }
    }
    poolInto(acc, C);
  }

  const total = new Float64Array(S);
  for (const acc of perTextTriples) for (let i = 0; i < S; i++) total[i] = total[i]! + acc[i]!;
  const summarise = (arr: Float64Array, at: number): BinaryAgreement => {
    const r = binaryFromTriple(arr[at]!, arr[at + 1]!, arr[at + 2]!);
    const { value, ...rest } = r;
    return value === null ? { alpha: null, ...rest } : { alpha: value, ...rest, band: krippendorffBand(value) };
  };
  const perCode: CodeReport[] = codes.map((codeId, c) => ({ codeId, ...summarise(total, c * 3) }));
  const pooled = summarise(total, C * 3);
  const perText: TextReport[] = study.texts.map((t, i) => ({
    textId: t.textId,
    coders: [...(t.coders ?? coders)],
    ...summarise(perTextTriples[i]!, C * 3),
  }));
  const perCoderPair: PairReport[] = pairs.map(([a, b], i) => {
    const sum: [[number, number], [number, number]] = [[0, 0], [0, 0]];
    const byCode = codes.map((codeId, c) => {
      const at = (i * C + c) * 4;
      const t: [[number, number], [number, number]] = [[pairTables[at]!, pairTables[at + 1]!], [pairTables[at + 2]!, pairTables[at + 3]!]];
      for (let x = 0; x < 2; x++) for (let y = 0; y < 2; y++) sum[x]![y]! += t[x]![y]!;
      const al = tableAlpha(t);
      const k = cohenKappa(t);
      return {
        codeId,
        alpha: al.value,
        ...(al.reason ? { reason: al.reason } : {}),
        kappa: k.value,
        ...(k.reason ? { kappaReason: k.reason } : {}),
        percentAgreement: al.percentAgreement,
      };
    });
    const al = tableAlpha(sum);
    const { value, ...rest } = al;
    return {
      coders: [coders[a]!, coders[b]!],
      ...(value === null ? { alpha: null } : { alpha: value, band: krippendorffBand(value) }),
      ...rest,
      kappa: cohenKappa(sum),
      table: sum,
      perCode: byCode,
    };
  });

  const report: AgreementReport = { unit, coders, codes, texts: study.texts.length, ignoredSegments, pooled, perCode, perText, perCoderPair };
  if (boot) {
    const clusters = boot.scheme === 'texts' ? perTextTriples : unitClusters;
    const cis = clusterBootstrap(clusters, C, boot.replicates, boot.seed >>> 0, boot.confidence);
    perCode.forEach((r, c) => (r.ci = cis[c]!));
    pooled.ci = cis[C]!;
    report.bootstrap = { scheme: boot.scheme, replicates: boot.replicates, seed: boot.seed >>> 0, confidence: boot.confidence, method: 'percentile (type 7)' };
  }
  if (options.unitizing) addUnitizing(report, study, coders);
  return report;
}

function poolInto(acc: Float64Array, C: number): void {
  for (let c = 0; c < C; c++) for (let j = 0; j < 3; j++) acc[C * 3 + j] = acc[C * 3 + j]! + acc[c * 3 + j]!;
}

/** Binary alpha of two coders from their 2x2 table: coincidences o = T + T'. */
function tableAlpha(t: [[number, number], [number, number]]) {
  return binaryFromTriple(2 * t[0][0], t[0][1] + t[1][0], 2 * t[1][1]);
}

/**
 * Percentile intervals from resampling clusters (texts or units) with replacement; the same draw serves
 * every code and the pooled value within a replicate. Replicates where a value is undefined are left out.
 */
function clusterBootstrap(clusters: Float64Array[], C: number, replicates: number, seed: number, confidence: number): Array<[number, number] | null> {
  const K = clusters.length;
  const S = (C + 1) * 3;
  const samples: number[][] = Array.from({ length: C + 1 }, () => []);
  if (K === 0) return samples.map(() => null);
  const rand = mulberry32(seed);
  const acc = new Float64Array(S);
  for (let r = 0; r < replicates; r++) {
    acc.fill(0);
    for (let i = 0; i < K; i++) {
      const cl = clusters[Math.floor(rand() * K)]!;
      for (let j = 0; j < S; j++) acc[j] = acc[j]! + cl[j]!;
    }
    for (let c = 0; c <= C; c++) {
      const v = binaryFromTriple(acc[c * 3]!, acc[c * 3 + 1]!, acc[c * 3 + 2]!).value;
      if (v !== null) samples[c]!.push(v);
    }
  }
  const tail = (1 - confidence) / 2;
  return samples.map((s) => {
    if (s.length === 0) return null;
    s.sort((a, b) => a - b);
    return [quantile(s, tail), quantile(s, 1 - tail)];
  });
}

/**
 * Unitizing alpha (1995/2004) per text and code, and per code over the texts laid end to end (only
 * when every text has the same coders; a gap at the end of one text then joins the gap at the start
 * of the next).
 */
function addUnitizing(report: AgreementReport, study: StudyData, coders: string[]): void {
  const { codes } = report;
  study.texts.forEach((text, i) => {
    const own = [...(text.coders ?? coders)];
    if (own.length < 2 || text.textLength === 0) {
      report.perText[i]!.unitizing = { value: null, reason: 'no-pairable-values', perCode: [] };
      return;
    }
    const r = unitizingAlpha1995(unitizingSpans(text, codes), { start: 0, end: text.textLength }, { coders: own, categories: codes });
    report.perText[i]!.unitizing = {
      ...estimate(r),
      perCode: r.perCategory.map((p) => ({ codeId: String(p.category), ...estimate(p) })),
    };
  });
  const sameCoders = study.texts.every((t) => JSON.stringify(t.coders ?? coders) === JSON.stringify(study.texts[0]!.coders ?? coders));
  const length = study.texts.reduce((s, t) => s + t.textLength, 0);
  const own = [...(study.texts[0]?.coders ?? coders)];
  if (!sameCoders || length === 0 || own.length < 2) return;
  let offset = 0;
  const spans = study.texts.flatMap((t) => {
    const out = unitizingSpans(t, codes).map((s) => ({ ...s, start: s.start + offset, end: s.end + offset }));
    offset += t.textLength;
    return out;
  });
  const r = unitizingAlpha1995(spans, { start: 0, end: length }, { coders: own, categories: codes });
  r.perCategory.forEach((p, c) => (report.perCode[c]!.unitizing = estimate(p)));
}

function estimate(e: { value: number | null; reason?: UndefinedReason }): UnitizingSummary {
  return e.value === null ? { value: null, reason: e.reason ?? 'no-variation' } : { value: e.value };
}
