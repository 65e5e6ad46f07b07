import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import fc from 'fast-check';
import { addCode, createCodebookDoc, getCode, getCodes, listChanges } from './codebook-doc.js';
import {
  applyMergeToLayer, applySplitToLayer, effectiveCodeId, mergeCodes, moveCode, previewMerge, previewSplit,
  reconcileLayer, renameCode, retireCode, splitCode,
} from './codebook-ops.js';
import { createTextDoc } from './text-doc.js';
import { addSegment, listSegments, newLayerDoc } from './layer-doc.js';
import { ConflictError } from './errors.js';

let t = 0;
const lead = { by: 'lead', clock: () => ++t };
const text = createTextDoc({ turns: [{ speaker: 'P9', startMs: 0, endMs: null, text: 'x'.repeat(200) }] });

describe('second-cycle operations', () => {
  it('renames and re-parents; refuses to put a code under its own descendant', () => {
    const cb = createCodebookDoc();
    const a = addCode(cb, { label: 'work' }, lead);
    const b = addCode(cb, { label: 'shifts', parentId: a }, lead);
    renameCode(cb, a, 'paid work', { ...lead, reason: 'clearer' });
    expect(getCode(cb, a).label).toBe('paid work');
    expect(() => moveCode(cb, a, b, lead)).toThrow(ConflictError);
    moveCode(cb, b, null, lead);
    expect(getCode(cb, b).parentId).toBeNull();
    expect(listChanges(cb, a).map((c) => c.kind)).toEqual(['add', 'rename']);
  });

  it('merge: every segment in every layer follows into the merged code (random layers)', () => {
    fc.assert(
      fc.property(fc.array(fc.array(fc.nat(3), { maxLength: 30 }), { minLength: 1, maxLength: 4 }), (layerCodes) => {
        const cb = createCodebookDoc();
        const codes = ['c0', 'c1', 'c2', 'c3'].map((id) => addCode(cb, { id, label: id }, lead));
        const layers = layerCodes.map((cs) => {
          const l = newLayerDoc();
          cs.forEach((c, i) => addSegment(l, text, { codeId: codes[c]!, start: i, end: i + 5 }, lead.clock));
          return l;
        });
        const before = new Map(layers.map((l, i) => [`L${i}`, listSegments(l)]));
        const preview = previewMerge(before, ['c1', 'c2'], 'c0');
        mergeCodes(cb, ['c1', 'c2'], 'c0', lead);
        let recoded = 0;
        for (const l of layers) recoded += reconcileLayer(cb, l);
        expect(recoded).toBe(preview.count);
        layers.forEach((l, i) => {
          const after = listSegments(l);
          expect(after.map((s) => s.id)).toEqual(before.get(`L${i}`)!.map((s) => s.id)); // none lost
          for (const s of after) expect(['c0', 'c3']).toContain(s.codeId);
        });
        expect(effectiveCodeId(cb, 'c2')).toBe('c0');
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 200) },
    );
  });

  it('split: every segment ends on its assigned new code or stays, flagged, on the old one (random layers)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(fc.tuple(fc.boolean(), fc.nat(2)), { maxLength: 20 }), { minLength: 1, maxLength: 3 }),
        (layerSpec) => {
          const cb = createCodebookDoc();
          const old = addCode(cb, { id: 'old', label: 'old' }, lead);
          addCode(cb, { id: 'other', label: 'other' }, lead);
          const assignment = new Map<string, string>();
          const targets = ['n0', 'n1', 'n2'];
          const layers = layerSpec.map((spec) => {
            const l = newLayerDoc();
            spec.forEach(([assigned, to], i) => {
              const id = addSegment(l, text, { codeId: i % 4 === 3 ? 'other' : old, start: i, end: i + 3 }, lead.clock);
              if (assigned && i % 4 !== 3) assignment.set(id, targets[to]!);
            });
            return l;
          });
          const before = layers.map((l) => listSegments(l));
          splitCode(cb, old, targets.map((id) => ({ id, label: id })), assignment, lead);
          layers.forEach((l) => reconcileLayer(cb, l));
          layers.forEach((l, i) => {
            const after = new Map(listSegments(l).map((s) => [s.id, s.codeId]));
            expect([...after.keys()]).toEqual(before[i]!.map((s) => s.id));
            for (const s of before[i]!) {
              const want = s.codeId === old ? (assignment.get(s.id) ?? old) : s.codeId;
              expect(after.get(s.id)).toBe(want);
            }
          });
        },
      ),
      { numRuns: Number(process.env.FC_RUNS ?? 200) },
    );
  });

  it('merge refuses self-merges and merging into a merged code', () => {
    const cb = createCodebookDoc();
    const [a, b, c] = ['a', 'b', 'c'].map((id) => addCode(cb, { id, label: id }, lead));
    expect(() => mergeCodes(cb, [a!], a!, lead)).toThrow(ConflictError);
    mergeCodes(cb, [b!], a!, lead);
    expect(() => mergeCodes(cb, [c!], b!, lead)).toThrow(ConflictError);
    expect(getCode(cb, c!).status).toBe('active');
  });

  it('split: each segment goes to its assigned new code; unassigned ones stay visible on the retired code', () => {
    const cb = createCodebookDoc();
    const old = addCode(cb, { label: 'family' }, lead);
    const la = newLayerDoc();
    const lb = newLayerDoc();
    const s1 = addSegment(la, text, { codeId: old, start: 0, end: 5 }, lead.clock);
    const s2 = addSegment(la, text, { codeId: old, start: 10, end: 15 }, lead.clock);
    const s3 = addSegment(lb, text, { codeId: old, start: 20, end: 25 }, lead.clock);
    const s4 = addSegment(lb, text, { codeId: old, start: 30, end: 35 }, lead.clock);
    const assignment = new Map([[s1, 'kin'], [s2, 'household'], [s3, 'kin']]);
    const preview = previewSplit(new Map([['a', listSegments(la)], ['b', listSegments(lb)]]), old, assignment);
    expect([preview.count, preview.unassigned.map((u) => u.segmentId)]).toEqual([4, [s4]]);
    const ids = splitCode(cb, old, [{ id: 'kin', label: 'kin' }, { id: 'household', label: 'household' }], assignment, lead);
    expect(ids).toEqual(['kin', 'household']);
    expect(getCode(cb, old)).toMatchObject({ status: 'retired', splitInto: ['kin', 'household'] });
    const ra = applySplitToLayer(cb, old, la);
    expect([ra.recoded.sort(), ra.unassigned]).toEqual([[s1, s2].sort(), []]);
    expect(reconcileLayer(cb, lb)).toBe(1); // reconcile applies splits too: s3 moves, s4 has no assignment

    const codesNow = [...listSegments(la), ...listSegments(lb)].map((s) => [s.id, s.codeId]);
    expect(new Map(codesNow as Array<[string, string]>)).toEqual(new Map([[s1, 'kin'], [s2, 'household'], [s3, 'kin'], [s4, old]]));
  });

  it('an offline client that applied a merged code catches up on reconcile; explicit mappings work too', () => {
    const cb = createCodebookDoc();
    const [a, b] = ['a', 'b'].map((id) => addCode(cb, { id, label: id }, lead));
    const layer = newLayerDoc();
    const offline = new Y.Doc({ gc: false });
    mergeCodes(cb, [a!], b!, lead);
    addSegment(offline, text, { codeId: a!, start: 1, end: 4 }, lead.clock);
    Y.applyUpdate(layer, Y.encodeStateAsUpdate(offline));
    expect(listSegments(layer)[0]!.codeId).toBe(a);
    expect(reconcileLayer(cb, layer)).toBe(1);
    expect(listSegments(layer)[0]!.codeId).toBe(b);
    expect(applyMergeToLayer(layer, new Map([[b!, 'z']]))).toBe(1);
    retireCode(cb, b!, lead);
    expect(getCodes(cb).map((c) => c.status)).toEqual(['merged', 'retired']);
  });
});
