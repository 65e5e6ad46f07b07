import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { characterData, fixedUnitData, unitizingSpans } from './adapters.js';
import { krippendorffAlpha } from './alpha.js';
import type { CodedText } from './coded-text.js';
import { cohenKappa } from './kappa.js';
import { percentAgreement } from './percent.js';
import { mulberry32 } from './random.js';
import { agreementReport, type StudyData } from './report.js';
import { tableFromData } from './table.js';
import { unitizingAlpha1995 } from './unitizing-1995.js';

/** An invented study: texts of turns, coders who mostly agree, a few codes. */
function inventStudy(seed: number, texts = 4, coders = ['ana', 'ben', 'caro'], codes = ['hope', 'loss', 'work', 'kin']): StudyData {
  const rand = mulberry32(seed);
  const out: CodedText[] = [];
  for (let t = 0; t < texts; t++) {
    const units = [];
    let pos = 0;
    for (let u = 0; u < 6 + Math.floor(rand() * 6); u++) {
      const len = 5 + Math.floor(rand() * 20);
      units.push({ start: pos, end: pos + len });
      pos += len;
    }
    const segments = [];
    for (let s = 0; s < 8; s++) {
      const start = Math.floor(rand() * (pos - 4));
      const end = Math.min(pos, start + 1 + Math.floor(rand() * 25));
      const codeId = codes[Math.floor(rand() * codes.length)]!;
      for (const coderId of coders) {
        if (rand() < 0.25) continue;
        const jitter = () => Math.floor(rand() * 5) - 2;
        const a = Math.max(0, start + jitter());
        const b = Math.min(pos, Math.max(a + 1, end + jitter()));
        segments.push({ coderId, codeId: rand() < 0.1 ? codes[Math.floor(rand() * codes.length)]! : codeId, start: a, end: b });
      }
    }
    out.push({ textId: `text-${t}`, textLength: pos, units, segments });
  }
  return { texts: out, coders, codes };
}

/** Reliability data for one code over all texts, units side by side (missing rows for coders outside a text). */
function concatenated(study: StudyData, codeIds: string[], kind: 'fixed' | 'character'): Array<Array<number | null>> {
  const coders = study.coders!;
  const rows: Array<Array<number | null>> = coders.map(() => []);
  for (const text of study.texts) {
    const own = text.coders ?? coders;
    for (const code of codeIds) {
      const d = kind === 'fixed' ? fixedUnitData(text, code, own) : characterData(text, code, own);
      const width = d[0]?.length ?? 0;
      coders.forEach((c, i) => {
        const k = own.indexOf(c);
        rows[i]!.push(...(k >= 0 ? d[k]! : new Array<number | null>(width).fill(null)));
      });
    }
  }
  return rows;
}

describe('agreementReport agrees with the coefficients on the same data laid out as reliability data', () => {
  for (const unit of ['fixed', 'character'] as const) {
    it(`${unit} units: per code, pooled, per text and per pair (property, random invented studies)`, () => {
      fc.assert(
        fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
          const study = inventStudy(seed);
          const r = agreementReport(study, { unit, unitizing: true, bootstrap: { replicates: 20, seed } });
          const bad: unknown[] = [];
          JSON.stringify(r, (k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) && bad.push(k), v));
          expect(bad).toEqual([]);
          for (const pc of r.perCode) {
            const want = krippendorffAlpha(concatenated(study, [pc.codeId], unit));
            if (want.value === null) expect(pc.alpha).toBeNull();
            else expect(pc.alpha).toBeCloseTo(want.value, 9);
            expect(pc.percentAgreement).toBeCloseTo(percentAgreement(concatenated(study, [pc.codeId], unit)).value!, 9);
          }
          const all = krippendorffAlpha(concatenated(study, study.codes as string[], unit)).value!;
          expect(r.pooled.alpha).toBeCloseTo(all, 9);
          const one = krippendorffAlpha(concatenated({ ...study, texts: [study.texts[0]!] }, study.codes as string[], unit)).value;
          if (one === null) expect(r.perText[0]!.alpha).toBeNull();
          else expect(r.perText[0]!.alpha).toBeCloseTo(one, 9);
          const rows = concatenated(study, study.codes as string[], unit);
          const pair = r.perCoderPair.find((p) => p.coders[0] === 'ana' && p.coders[1] === 'caro')!;
          const t = tableFromData([rows[0]!, rows[2]!], [0, 1]).table;
          expect(pair.table).toEqual(t);
          const k = cohenKappa(t).value;
          if (k === null) expect(pair.kappa.value).toBeNull();
          else expect(pair.kappa.value).toBeCloseTo(k, 9);
          const pa = krippendorffAlpha([rows[0]!, rows[2]!]).value;
          if (pa === null) expect(pair.alpha).toBeNull();
          else expect(pair.alpha).toBeCloseTo(pa, 9);
        }),
        { numRuns: 25 },
      );
    });
  }
  it('a text coded by only some coders: the others are missing there, not absent', () => {
    const study = inventStudy(11);
    const texts = study.texts.map((t, i) => (i === 1 ? { ...t, coders: ['ana', 'ben'], segments: t.segments.filter((s) => s.coderId !== 'caro') } : t));
    const s2 = { ...study, texts };
    const r = agreementReport(s2, { unit: 'fixed' });
    const want = krippendorffAlpha(concatenated(s2, ['hope'], 'fixed')).value!;
    expect(r.perCode[0]!.alpha).toBeCloseTo(want, 9);
    expect(r.perText[1]!.coders).toEqual(['ana', 'ben']);
  });
});

describe('agreementReport: bootstrap, unitizing, bookkeeping', () => {
  it('seeded bootstrap: same seed, same intervals; intervals bracket the estimate; both schemes', () => {
    const study = inventStudy(5, 12);
    for (const scheme of ['texts', 'units'] as const) {
      const a = agreementReport(study, { bootstrap: { replicates: 400, seed: 9, scheme } });
      const b = agreementReport(study, { bootstrap: { replicates: 400, seed: 9, scheme } });
      expect(a.pooled.ci).toEqual(b.pooled.ci);
      expect(a.perCode.map((c) => c.ci)).toEqual(b.perCode.map((c) => c.ci));
      expect(a.pooled.ci![0]).toBeLessThanOrEqual(a.pooled.alpha!);
      expect(a.pooled.ci![1]).toBeGreaterThanOrEqual(a.pooled.alpha!);
      expect(a.bootstrap).toMatchObject({ scheme, replicates: 400, seed: 9 });
    }
  });
  it('perfect agreement: alpha 1, interval [1, 1], band reliable', () => {
    const study = inventStudy(3, 6, ['ana']);
    const texts = study.texts.map((t) => ({ ...t, segments: t.segments.flatMap((s) => [s, { ...s, coderId: 'ben' }]) }));
    const r = agreementReport({ ...study, texts, coders: ['ana', 'ben'] }, { bootstrap: { seed: 1, replicates: 200 } });
    expect(r.pooled.alpha).toBe(1);
    expect(r.pooled.ci).toEqual([1, 1]);
    expect(r.pooled.band).toBe('reliable');
  });
  it('unitizing: per text and code equals unitizingAlpha1995 on the same spans', () => {
    const study = inventStudy(8, 3);
    const r = agreementReport(study, { unit: 'character', unitizing: true });
    const t0 = study.texts[0]!;
    const want = unitizingAlpha1995(unitizingSpans(t0, study.codes), { start: 0, end: t0.textLength }, { coders: study.coders, categories: study.codes });
    expect(r.perText[0]!.unitizing!.value).toBeCloseTo(want.value!, 12);
    expect(r.perText[0]!.unitizing!.perCode.map((p) => p.value)).toEqual(want.perCategory.map((p) => p.value));
    expect(r.perCode.every((c) => c.unitizing !== undefined)).toBe(true);
  });
  it('a code nobody used: alpha null with a reason; segments with codes outside the list are counted', () => {
    const study = inventStudy(4, 2);
    const r = agreementReport({ ...study, codes: ['hope', 'never-used'] });
    expect(r.perCode[1]).toMatchObject({ codeId: 'never-used', alpha: null, reason: 'no-variation' });
    expect(r.ignoredSegments).toBe(study.texts.flatMap((t) => t.segments).filter((s) => s.codeId !== 'hope').length);
  });
  it('refuses bad input with typed errors', () => {
    const study = inventStudy(2, 1);
    const t = study.texts[0]!;
    const bad = (s: StudyData, code: string, opts = {}) => expect(() => agreementReport(s, opts)).toThrow(expect.objectContaining({ code }));
    bad({ ...study, texts: [{ ...t, segments: [{ coderId: 'ana', codeId: 'hope', start: 0, end: t.textLength + 1 }] }] }, 'span-outside-continuum');
    bad({ ...study, texts: [{ ...t, segments: [{ coderId: 'zed', codeId: 'hope', start: 0, end: 1 }] }] }, 'invalid-input');
    bad({ ...study, texts: [{ ...t, units: undefined }] }, 'invalid-input', { unit: 'fixed' });
    bad(study, 'invalid-input', { unit: 'character', bootstrap: { scheme: 'units' } });
    bad({ ...study, coders: Array.from({ length: 31 }, (_, i) => `c${i}`) }, 'too-many-coders');
    bad({ texts: 'x' } as never, 'invalid-input');
  });
});
