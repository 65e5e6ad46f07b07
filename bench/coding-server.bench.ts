/**
 * Server side of the coding model, on an invented 30,000-word transcript with 5 layers x 2,000
 * segments and a 40-code codebook (no reference to compare against; DESIGN §9 lists none):
 * - GET /api/texts/:id/segments work: load the documents from their updates, resolve every segment
 *   and compute the flags (`segmentsWithFlags`);
 * - projection of that text (all 10,000 segment rows rewritten in one transaction) on in-memory PGlite.
 * Figures are medians with the fastest run alongside (the machine is shared).
 */
import { mulberry32 } from '@gloss/agreement';
import { openDatabase } from '@gloss/db';
import { addCode, addSegment, createCodebookDoc, createTextDoc, newLayerDoc, type Transcript } from '@gloss/model';
import * as Y from 'yjs';
import { addTextFromTranscript, createStudy, createUser, ensureLayer } from '../apps/server/src/admin/index.js';
import { segmentsWithFlags } from '../apps/server/src/http/segments.js';
import { loadDoc, projectDocument } from '../apps/server/src/projection/index.js';

const WORDS = ['harbour', 'net', 'rope', 'boat', 'winter', 'uncle', 'shed', 'tide', 'market', 'fish', 'early', 'cold', 'we', 'then', 'and', 'the'];

function inventTranscript(rand: () => number, words: number): Transcript {
  const turns: Transcript['turns'] = [];
  let left = words;
  for (let i = 0; left > 0; i++) {
    const n = Math.min(left, 100 + Math.floor(rand() * 100));
    left -= n;
    turns.push({ speaker: i % 2 ? 'P11' : 'I', startMs: null, endMs: null, text: Array.from({ length: n }, () => WORDS[Math.floor(rand() * WORDS.length)]).join(' ') + '.' });
  }
  return { turns };
}

function time(runs: number, fn: () => unknown) {
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  return { medianMs: Math.round(ms[Math.floor(runs / 2)]! * 100) / 100, minMs: Math.round(ms[0]! * 100) / 100, runs };
}

async function timeAsync(runs: number, fn: () => Promise<unknown>) {
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  return { medianMs: Math.round(ms[Math.floor(runs / 2)]! * 100) / 100, minMs: Math.round(ms[0]! * 100) / 100, runs };
}

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  const rand = mulberry32(11);
  const transcript = inventTranscript(rand, 30_000);
  const textDoc = createTextDoc(transcript);
  const length = textDoc.getText('text').length;
  const cb = createCodebookDoc();
  const codes = Array.from({ length: 40 }, (_, i) => addCode(cb, { label: `Code ${i}` }, { by: 'bench' }));
  const layers = Array.from({ length: 5 }, () => {
    const l = newLayerDoc();
    l.transact(() => {
      for (let s = 0; s < 2_000; s++) {
        const start = Math.floor(rand() * (length - 300));
        addSegment(l, textDoc, { codeId: codes[Math.floor(rand() * codes.length)]!, start, end: start + 10 + Math.floor(rand() * 280) });
      }
    });
    return l;
  });

  // Endpoint work: documents from stored updates, then resolution and flags.
  const stored = new Map<string, Uint8Array[]>();
  stored.set('text', [Y.encodeStateAsUpdate(textDoc)]);
  stored.set('cb', [Y.encodeStateAsUpdate(cb)]);
  layers.forEach((l, i) => stored.set(`layer${i}`, [Y.encodeStateAsUpdate(l)]));
  const memory = { load: async (id: string) => ({ updates: stored.get(id)!, seq: 1 }) };
  const load = await timeAsync(5, async () => {
    for (const id of stored.keys()) (await loadDoc(memory, id)).destroy();
  });
  let count = 0;
  let flagCount = 0;
  const resolveAndFlag = time(3, () => {
    const out = segmentsWithFlags(textDoc, cb, layers.map((doc, i) => ({ layerDocId: `layer${i}`, coderId: `coder${i}`, doc })));
    count = out.length;
    flagCount = out.reduce((n, s) => n + s.flags.length, 0);
  });

  // Projection into PGlite (in memory): the whole text, 10,000 rows, one transaction.
  const database = await openDatabase({});
  try {
    const db = database.db;
    const owner = await createUser(db, { email: 'bench.owner@example.test', name: 'Bench Owner', password: 'bench-password-1' });
    const study = await createStudy(db, { title: 'Bench study', createdBy: owner.id });
    const text = await addTextFromTranscript(db, study.id, { title: 'Bench text', transcript, sourceFormat: 'txt', createdBy: owner.id });
    const byId = new Map<string, Uint8Array[]>([[text.room, [Y.encodeStateAsUpdate(textDoc)]]]);
    for (let i = 0; i < layers.length; i++) {
      const coder = await createUser(db, { email: `bench.coder${i}@example.test`, name: `Coder ${i}`, password: 'bench-password-1' });
      byId.set(await ensureLayer(db, study.id, text.id, coder.id), [Y.encodeStateAsUpdate(layers[i]!)]);
    }
    const loader = { load: async (id: string) => ({ updates: byId.get(id) ?? [], seq: 1 }) };
    const projection = await timeAsync(2, () => projectDocument(db, loader, text.room));
    return [
      { name: 'segments-endpoint-load', docs: stored.size, ...load },
      // Random segments overlap far more than coders' do, so the flag count (and cost) is a worst case.
      { name: 'segments-endpoint-resolve-and-flags', segments: count, characters: length, segmentFlagKinds: flagCount, ...resolveAndFlag },
      { name: 'projection-text-5-layers', rows: count, db: 'pglite-memory', ...projection },
    ];
  } finally {
    await database.close();
  }
}
