import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import { createTextDoc, getText } from '../text-doc.js';
import { addSegment, listSegments, newLayerDoc, recheckSegment, recodeSegment, removeSegment, resizeSegment } from '../layer-doc.js';
import { addCode, addExclusiveSet, createCodebookDoc, setExclusiveSetMember, startRound, updateCodeField } from '../codebook-doc.js';
import { mergeCodes, retireCode } from '../codebook-ops.js';
import { computeFlags, FlagEngine, sortFlags } from './engine.js';

// The incremental engine must always equal a from-scratch computation of the same rules.
type Op =
  | { k: 'add'; layer: number; code: number; at: number; len: number }
  | { k: 'remove' | 'recheck'; layer: number; pick: number }
  | { k: 'recode'; layer: number; pick: number; code: number }
  | { k: 'resize'; layer: number; pick: number; at: number; len: number }
  | { k: 'ins'; at: number; n: number }
  | { k: 'del'; at: number; n: number }
  | { k: 'merge' | 'retire'; code: number; into: number }
  | { k: 'set'; code: number; member: boolean }
  | { k: 'define'; code: number; round: boolean }
  | { k: 'independent'; on: boolean }
  | { k: 'remote'; at: number; n: number; del: boolean; sync: boolean };

const op: fc.Arbitrary<Op> = fc.oneof(
  { weight: 4, arbitrary: fc.record({ k: fc.constant('add' as const), layer: fc.nat(2), code: fc.nat(4), at: fc.nat(), len: fc.integer({ min: 1, max: 30 }) }) },
  fc.record({ k: fc.constantFrom('remove' as const, 'recheck' as const), layer: fc.nat(2), pick: fc.nat() }),
  fc.record({ k: fc.constant('recode' as const), layer: fc.nat(2), pick: fc.nat(), code: fc.nat(4) }),
  fc.record({ k: fc.constant('resize' as const), layer: fc.nat(2), pick: fc.nat(), at: fc.nat(), len: fc.integer({ min: 1, max: 30 }) }),
  { weight: 3, arbitrary: fc.record({ k: fc.constant('ins' as const), at: fc.nat(), n: fc.integer({ min: 1, max: 10 }) }) },
  { weight: 3, arbitrary: fc.record({ k: fc.constant('del' as const), at: fc.nat(), n: fc.integer({ min: 1, max: 25 }) }) },
  fc.record({ k: fc.constantFrom('merge' as const, 'retire' as const), code: fc.nat(4), into: fc.nat(4) }),
  fc.record({ k: fc.constant('set' as const), code: fc.nat(4), member: fc.boolean() }),
  fc.record({ k: fc.constant('define' as const), code: fc.nat(4), round: fc.boolean() }),
  fc.record({ k: fc.constant('independent' as const), on: fc.boolean() }),
  { weight: 3, arbitrary: fc.record({ k: fc.constant('remote' as const), at: fc.nat(), n: fc.integer({ min: 1, max: 12 }), del: fc.boolean(), sync: fc.boolean() }) },
);

describe('FlagEngine', () => {
  it('after every random edit, incremental flags equal a full recomputation', () => {
    fc.assert(
      fc.property(fc.array(op, { minLength: 1, maxLength: 40 }), (ops) => {
        let t = 0;
        const clock = () => ++t;
        const actor = { by: 'lead', clock };
        const text = createTextDoc({ turns: [{ speaker: 'P1', startMs: 0, endMs: null, text: 'the river flooded twice that spring and the school shut for a week so we cooked for the neighbours' }] });
        // a second replica of the text edits concurrently and is merged in at random moments
        const remote = new Y.Doc({ gc: false });
        Y.applyUpdate(remote, Y.encodeStateAsUpdate(text));
        const cb = createCodebookDoc();
        const codes = ['a', 'b', 'c', 'd', 'e'].map((id) => addCode(cb, { id, label: id }, actor));
        const setId = addExclusiveSet(cb, 'pair', ['a', 'b'], actor);
        const layers = ['x', 'y', 'z'].map((c) => ({ layerId: `L-${c}`, coder: c, doc: newLayerDoc() }));
        let independent = false;
        const engine = new FlagEngine({ textDoc: text, codebook: cb, layers });
        const textLen = () => getText(text).length;
        for (const o of ops) {
          const len = textLen();
          const layer = 'layer' in o ? layers[o.layer]!.doc : undefined;
          const segs = layer ? listSegments(layer) : [];
          const pick = 'pick' in o && segs.length > 0 ? segs[o.pick % segs.length]!.id : undefined;
          switch (o.k) {
            case 'add':
              if (len > 1) {
                const at = o.at % (len - 1);
                addSegment(layer!, text, { codeId: codes[o.code]!, start: at, end: Math.min(len, at + o.len) }, clock);
              }
              break;
            case 'remove':
              if (pick) removeSegment(layer!, pick);
              break;
            case 'recheck':
              if (pick) recheckSegment(layer!, pick, clock);
              break;
            case 'recode':
              if (pick) recodeSegment(layer!, pick, codes[o.code]!);
              break;
            case 'resize':
              if (pick && len > 1) {
                const at = o.at % (len - 1);
                resizeSegment(layer!, text, pick, at, Math.min(len, at + o.len));
              }
              break;
            case 'ins':
              getText(text).insert(o.at % (len + 1), 'x'.repeat(o.n));
              break;
            case 'del':
              if (len > 20) {
                const at = o.at % len;
                getText(text).delete(at, Math.min(o.n, len - at));
              }
              break;
            case 'merge':
              if (o.code !== o.into) {
                try {
                  mergeCodes(cb, [codes[o.code]!], codes[o.into]!, actor);
                } catch {
                  /* merging into a merged code is refused; nothing changed */
                }
              }
              break;
            case 'retire':
              retireCode(cb, codes[o.code]!, actor);
              break;
            case 'set':
              setExclusiveSetMember(cb, setId, codes[o.code]!, o.member, actor);
              break;
            case 'define':
              if (o.round) startRound(cb, actor);
              updateCodeField(cb, codes[o.code]!, 'inclusion', `version ${t}`, actor);
              break;
            case 'remote': {
              const rt = getText(remote);
              if (o.del && rt.length > 20) rt.delete(o.at % rt.length, Math.min(o.n, rt.length - (o.at % rt.length)));
              else rt.insert(o.at % (rt.length + 1), 'r'.repeat(o.n));
              if (o.sync) {
                Y.applyUpdate(text, Y.encodeStateAsUpdate(remote, Y.encodeStateVector(text)));
                Y.applyUpdate(remote, Y.encodeStateAsUpdate(text, Y.encodeStateVector(remote)));
              }
              break;
            }
            case 'independent':
              independent = o.on;
              engine.setIndependentCoding(o.on);
              break;
          }
          expect(sortFlags(engine.flags())).toEqual(computeFlags({ textDoc: text, codebook: cb, layers, independentCoding: independent }));
        }
        engine.destroy();
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 200) },
    );
  });
});
