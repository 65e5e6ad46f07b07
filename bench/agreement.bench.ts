/**
 * Agreement benchmarks (DESIGN.md §9):
 * - the full study report on an invented study (50 texts, 3 coders, 40 codes, ~30,000 segments,
 *   bootstrap 1,000), fixed units and character level; target < 1 s;
 * - nominal alpha on 5 coders x 100,000 units, ours against npm `krippendorff` 0.1.0 in the same run,
 *   with the speed-up; target >= 10x.
 * Figures are medians of several runs (the machine is shared), with the fastest run alongside.
 */
import { agreementReport, krippendorffAlpha, mulberry32, type CodedText, type StudyData } from '@gloss/agreement';
import { alpha as npmAlpha } from 'krippendorff';

interface Timing {
  medianMs: number;
  minMs: number;
  runs: number;
}

function time<T>(runs: number, fn: () => T): { timing: Timing; result: T } {
  const ms: number[] = [];
  let result!: T;
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    result = fn();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  const round = (x: number) => Math.round(x * 100) / 100;
  return { timing: { medianMs: round(ms[Math.floor(ms.length / 2)]!), minMs: round(ms[0]!), runs }, result };
}

/** Invented study: texts of ~100 turns (~30,000 characters), each coder's segments near shared "true" ones. */
function inventStudy(seed: number, texts: number, coders: string[], codes: number, segmentsPerCoderText: number): StudyData {
  const rand = mulberry32(seed);
  const codeIds = Array.from({ length: codes }, (_, i) => `code-${i}`);
  const out: CodedText[] = [];
  for (let t = 0; t < texts; t++) {
    const units: Array<{ start: number; end: number }> = [];
    let pos = 0;
    while (pos < 30_000) {
      const len = 80 + Math.floor(rand() * 440);
      units.push({ start: pos, end: pos + len });
      pos += len;
    }
    const segments: CodedText['segments'][number][] = [];
    for (let s = 0; s < segmentsPerCoderText; s++) {
      const start = Math.floor(rand() * (pos - 400));
      const end = start + 20 + Math.floor(rand() * 380);
      const codeId = codeIds[Math.floor(rand() * codes)]!;
      for (const coderId of coders) {
        const jitter = () => Math.floor(rand() * 41) - 20;
        const a = Math.max(0, start + jitter());
        const b = Math.min(pos, Math.max(a + 1, end + jitter()));
        segments.push({ coderId, codeId: rand() < 0.15 ? codeIds[Math.floor(rand() * codes)]! : codeId, start: a, end: b });
      }
    }
    out.push({ textId: `text-${t}`, textLength: pos, units, segments });
  }
  return { texts: out, coders, codes: codeIds };
}

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  const records: Array<Record<string, unknown> & { name: string }> = [];

  const study = inventStudy(2026, 50, ['ana', 'ben', 'caro'], 40, 200);
  const segments = study.texts.reduce((s, t) => s + t.segments.length, 0);
  for (const unit of ['fixed', 'character'] as const) {
    agreementReport(study, { unit, bootstrap: { replicates: 50, seed: 1 } }); // warm-up
    const { timing, result } = time(5, () => agreementReport(study, { unit, bootstrap: { replicates: 1000, seed: 1 } }));
    records.push({
      name: `agreement-report-${unit}`,
      texts: study.texts.length,
      coders: 3,
      codes: 40,
      segments,
      bootstrap: 1000,
      bootstrapScheme: result.bootstrap?.scheme,
      ...timing,
      targetMs: 1000,
      meetsTarget: timing.medianMs < 1000,
      pooledAlpha: result.pooled.alpha,
      pooledCi: result.pooled.ci,
    });
  }

  // 5 coders x 100,000 units, 4 values, ~10% missing; coders agree ~70% of the time.
  const rand = mulberry32(7);
  const coders = 5;
  const units = 100_000;
  const data: Array<Array<number | null>> = Array.from({ length: coders }, () => []);
  for (let u = 0; u < units; u++) {
    const truth = Math.floor(rand() * 4);
    for (let c = 0; c < coders; c++) data[c]!.push(rand() < 0.1 ? null : rand() < 0.7 ? truth : Math.floor(rand() * 4));
  }
  const npmData = data.map((row) => row.map((v) => (v === null ? undefined : v)));
  krippendorffAlpha(data); // warm-up
  npmAlpha(npmData);
  // Interleaved rounds so both see the same load on a shared machine.
  const oursMs: number[] = [];
  const theirsMs: number[] = [];
  let oursValue: number | null = null;
  let theirsValue = NaN;
  for (let round = 0; round < 3; round++) {
    const o = time(5, () => krippendorffAlpha(data).value);
    const t = time(1, () => npmAlpha(npmData));
    oursMs.push(o.timing.medianMs);
    theirsMs.push(t.timing.medianMs);
    oursValue = o.result;
    theirsValue = t.result;
  }
  const summary = (xs: number[]): Timing => {
    const s = [...xs].sort((a, b) => a - b);
    return { medianMs: s[Math.floor(s.length / 2)]!, minMs: s[0]!, runs: xs.length };
  };
  const ours = { timing: summary(oursMs), result: oursValue };
  const theirs = { timing: summary(theirsMs), result: theirsValue };
  const speedup = Math.round((theirs.timing.medianMs / ours.timing.medianMs) * 10) / 10;
  records.push({
    name: 'alpha-nominal-5x100k',
    coders,
    units,
    ours: ours.timing,
    npmKrippendorff010: theirs.timing,
    speedup,
    targetSpeedup: 10,
    meetsTarget: speedup >= 10,
    alpha: ours.result,
    sameValue: ours.result !== null && Math.abs(ours.result - theirs.result) < 1e-9,
    note: 'ours: median of per-round medians (5 runs each); npm: one run per round; rounds interleaved',
  });
  return records;
}
