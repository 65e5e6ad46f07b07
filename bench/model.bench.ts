/**
 * Model benchmarks (DESIGN.md §9), on an invented 30,000-word transcript with 5 layers x 2,000 segments,
 * lightly corrected (600 corrections, ~2,000 Yjs items) and heavily corrected (6,000, ~17,000 items):
 * - resolve all 10,000 segments in one pass (`resolveSegments`) against one-by-one
 *   `Y.createAbsolutePositionFromRelativePosition` (followUndoneDeletions = false) as the reference;
 *   target <= 10 ms;
 * - all flags from scratch, and flags after one edit (text correction, new segment, definition edit);
 *   target < 16 ms after one edit.
 * Figures are medians over repeated runs, with the fastest alongside (the machine is shared). The bulk
 * figure is given cold (anchors decoded afresh) and warm (same anchors again), beside the previous bulk
 * resolver (resolve-by-item.ts) interleaved in the same run: the machine is shared, ratios count.
 */
import { mulberry32 } from '@gloss/agreement';
import * as Y from 'yjs';
import {
  addCode, addExclusiveSet, addSegment, createCodebookDoc, createTextDoc, FlagEngine, getDefinitionText, getText,
  listSegments, newLayerDoc, resolveSegments, type SegmentRecord,
} from '@gloss/model';
import { freshAnchors, timeIt, timeResolvers } from './resolve-timing.js';

const round = (x: number) => Math.round(x * 100) / 100;
function stats(ms: number[]) {
  const s = [...ms].sort((a, b) => a - b);
  return { medianMs: round(s[Math.floor(s.length / 2)]!), minMs: round(s[0]!), runs: s.length };
}

const WORDS = ['the', 'ferry', 'winter', 'we', 'kept', 'going', 'because', 'my', 'mother', 'said', 'school', 'harbour', 'bread', 'neighbours', 'rota', 'council', 'bus', 'quiet', 'after', 'storm'];

interface Fixture {
  textDoc: Y.Doc;
  codebook: Y.Doc;
  codes: string[];
  layers: Array<{ layerId: string; coder: string; doc: Y.Doc }>;
  all: SegmentRecord[];
  items: number;
  rand: () => number;
}

function fixture(corrections: number): Fixture {
  const rand = mulberry32(20261201);
  const turns = Array.from({ length: 300 }, (_, i) => ({
    speaker: i % 2 === 0 ? 'I' : 'P21', startMs: i * 10_000, endMs: i * 10_000 + 9_000,
    text: Array.from({ length: 100 }, () => WORDS[Math.floor(rand() * WORDS.length)]).join(' '),
  }));
  const textDoc = createTextDoc({ turns });
  const text = getText(textDoc);
  const actor = { by: 'lead' };
  const codebook = createCodebookDoc();
  const codes = Array.from({ length: 40 }, (_, i) => addCode(codebook, { id: `code-${i}`, label: `code ${i}` }, actor));
  addExclusiveSet(codebook, 'stance', codes.slice(0, 4), actor);
  const layers = Array.from({ length: 5 }, (_, i) => ({ layerId: `layer-${i}`, coder: `coder-${i}`, doc: newLayerDoc() }));
  // segments first (anchoring into an unedited text is cheap); the corrections afterwards move them about
  const len = text.length;
  for (let k = 0; k < 2000; k++) {
    // shared passages that each coder marks with small differences, sometimes with another code
    const start = Math.floor(rand() * (len - 400));
    const width = 30 + Math.floor(rand() * 300);
    const code = codes[Math.floor(rand() * codes.length)]!;
    for (const l of layers) {
      const s = Math.max(0, start + Math.floor(rand() * 20) - 10);
      const other = rand() < 0.2 ? codes[Math.floor(rand() * codes.length)]! : code;
      addSegment(l.doc, textDoc, { codeId: other, start: s, end: Math.min(len, s + width + Math.floor(rand() * 20)) });
    }
  }
  // corrections: a few characters replaced here and there, which splits the text into many items
  for (let i = 0; i < corrections; i++) {
    const at = Math.floor(rand() * (text.length - 5));
    textDoc.transact(() => {
      text.delete(at, 1 + Math.floor(rand() * 3));
      text.insert(at, WORDS[Math.floor(rand() * WORDS.length)]!.slice(0, 1 + Math.floor(rand() * 3)));
    });
  }
  let items = 0;
  for (let n = text._start; n !== null; n = n.right) items++;
  return { textDoc, codebook, codes, layers, all: layers.flatMap((l) => listSegments(l.doc)), items, rand };
}

function benchResolve(f: Fixture, label: string, referenceSegments: number): Record<string, unknown> & { name: string } {
  const { textDoc, all } = f;
  // fresh anchor arrays defeat the decode cache, so "cold" includes decoding as a first resolution does;
  // the previous resolver interleaved in the same run, so both see the same machine load
  const fresh = (n?: number) => freshAnchors(all, n);
  const { cold, warm, prevCold, prevWarm } = timeResolvers(textDoc, all, 11);
  const ref: number[] = [];
  for (let r = 0; r < 3; r++) {
    const segs = fresh(referenceSegments);
    let pos: Array<[number, number]> = [];
    ref.push(timeIt(() => {
      pos = segs.map((s) => [
        Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(s.start), textDoc, false)!.index,
        Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(s.end), textDoc, false)!.index,
      ]);
    }));
    const bulk = resolveSegments(textDoc, segs);
    const mismatches = bulk.filter((b, i) => b.start !== pos[i]![0] || b.end !== pos[i]![1]).length;
    if (mismatches > 0) throw new Error(`bulk resolution differs from Yjs on ${mismatches} segments`);
  }
  const coldStats = stats(cold);
  const refStats = stats(ref);
  return {
    name: `model.resolve-10000-segments.${label}`,
    words: 30_000, characters: getText(textDoc).length, textItems: f.items, segments: all.length,
    bulkCold: coldStats, bulkWarm: stats(warm),
    reference: { name: 'one-by-one createAbsolutePositionFromRelativePosition (followUndoneDeletions=false)', segments: referenceSegments, ...refStats },
    speedupPerSegment: round((refStats.medianMs / referenceSegments) / (coldStats.medianMs / all.length)),
    previous: { name: 'previous bulk resolver (struct-store search per anchor, item cached on the anchor: resolve-by-item.ts)', cold: stats(prevCold), warm: stats(prevWarm) },
    coldToPreviousCold: round(coldStats.medianMs / stats(prevCold).medianMs),
    warmToPreviousWarm: round(stats(warm).medianMs / stats(prevWarm).medianMs),
    targetMs: 10,
  };
}

function benchFlags(f: Fixture): Record<string, unknown> & { name: string } {
  const { textDoc, codebook, layers, codes, rand } = f;
  const text = getText(textDoc);
  const fullMs: number[] = [];
  let flagCount = 0;
  for (let r = 0; r < 3; r++) {
    fullMs.push(timeIt(() => {
      const e = new FlagEngine({ textDoc, codebook, layers });
      flagCount = e.flags().length;
      e.destroy();
    }));
  }
  const engine = new FlagEngine({ textDoc, codebook, layers });
  engine.flags();
  const textEdit: number[] = [];
  const segEdit: number[] = [];
  const defEdit: number[] = [];
  const touched: number[] = [];
  for (let r = 0; r < 21; r++) {
    const at = Math.floor(rand() * (text.length - 10));
    textDoc.transact(() => {
      text.delete(at, 4);
      text.insert(at, 'mended');
    });
    textEdit.push(timeIt(() => engine.refresh()));
    touched.push(engine.lastRecomputed);
    const s = Math.floor(rand() * (text.length - 200));
    addSegment(layers[r % 5]!.doc, textDoc, { codeId: codes[r % codes.length]!, start: s, end: s + 120 });
    segEdit.push(timeIt(() => engine.refresh()));
    getDefinitionText(codebook, codes[r % codes.length]!, 'inclusion').insert(0, 'x');
    defEdit.push(timeIt(() => engine.refresh()));
  }
  engine.destroy();
  return {
    name: 'model.flags-5-layers-x-2000.heavily-corrected',
    segments: f.all.length, textItems: f.items, flags: flagCount,
    full: stats(fullMs),
    afterTextEdit: { ...stats(textEdit), segmentsReevaluatedMedian: stats(touched).medianMs },
    afterNewSegment: stats(segEdit),
    afterDefinitionEdit: stats(defEdit),
    targetMs: 16,
  };
}

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  const light = fixture(600);
  const out = [benchResolve(light, 'lightly-corrected', 10_000)];
  const heavy = fixture(6000);
  out.push(benchResolve(heavy, 'heavily-corrected', 1_000));
  out.push(benchFlags(heavy));
  return out;
}
