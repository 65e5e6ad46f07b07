/**
 * How the cost of segments grows (issue 11 items 4 and 6): a heavily corrected 30,000-word text (6,000
 * corrections after coding, ~17,000 Yjs items) with 5 layers of 200, 2,000 and 10,000 segments each
 * (1k, 10k, 50k segments), stored on embedded PGlite behind the composed server.
 * - `segments.resolve.<n>`: `resolveSegments` over all segments, cold (anchors decoded afresh) and warm;
 *   references: the previous bulk resolver (resolve-by-item.ts) interleaved in the same run, and
 *   one-by-one `Y.createAbsolutePositionFromRelativePosition` on 1,000 of them, per segment.
 * - `segments.flags.<n>`: flags after one text correction (incremental FlagEngine); reference: every
 *   flag from scratch.
 * - `segments.cache.<n>`: the route's text cache in process after a new segment and after a correction;
 *   reference: its previous way of answering (objects, sort, JSON.stringify), interleaved, same changes.
 * - `segments.route.<n>`: `GET /api/texts/:id/segments` over HTTP: first request (documents loaded from
 *   the log), a repeat, after a new segment, after a text correction; reference: the route's work
 *   before the text cache (documents loaded afresh + `segmentsWithFlags`), in the same process.
 * Target: route < 100 ms, cold resolution <= 10 ms at 10k. Medians with min and max (the machine is
 * shared; each record carries the 1-minute load average).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { get as httpGet } from 'node:http';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { mulberry32 } from '@gloss/agreement';
import { addCode, addExclusiveSet, addSegment, FlagEngine, getText, listSegments, type Transcript } from '@gloss/model';
import * as Y from 'yjs';
import { admin, createPgUpdateStore, loadConfig, startServer } from '@gloss/server';
import { loadDoc, withDocs } from '../apps/server/src/projection/load-doc.js';
import { createTextCache } from '../apps/server/src/segments/text-cache.js';
import { segmentsWithFlags } from '../apps/server/src/segments/with-flags.js';
import type { UpdateStore } from '../apps/server/src/sync/contracts.js';
import { freshAnchors, timeIt, timeResolvers } from './resolve-timing.js';

const WORDS = ['the', 'ferry', 'winter', 'we', 'kept', 'going', 'because', 'my', 'mother', 'said', 'school', 'harbour', 'bread', 'neighbours', 'rota', 'council', 'bus', 'quiet', 'after', 'storm'];
// SEGMENTS_SIZES=1000,10000 narrows the run (the 50k fixture takes minutes on a busy machine).
const SIZES = (process.env.SEGMENTS_SIZES ?? '1000,10000,50000').split(',').map(Number);
const note = (what: string) => process.stderr.write(`segments bench: ${what} (load ${loadavg()[0]!.toFixed(1)})\n`);
const LAYERS = 5;
const CORRECTIONS = 6_000;

const r2 = (x: number) => Math.round(x * 100) / 100;
function stats(ms: number[]) {
  const s = [...ms].sort((a, b) => a - b);
  return { medianMs: r2(s[Math.floor(s.length / 2)]!), minMs: r2(s[0]!), maxMs: r2(s.at(-1)!), runs: s.length };
}
const load1 = () => r2(loadavg()[0]!);

function transcript(rand: () => number): Transcript {
  return {
    turns: Array.from({ length: 300 }, (_, i) => ({
      speaker: i % 2 === 0 ? 'I' : 'P21',
      startMs: null,
      endMs: null,
      text: Array.from({ length: 100 }, () => WORDS[Math.floor(rand() * WORDS.length)]).join(' '),
    })),
  };
}

/**
 * A GET on a connection of its own. The server runs in this process: while the bench builds a fixture
 * synchronously, the server's keep-alive timer and the client's next request on the pooled socket come
 * due in the same turn, and the request met a closed socket (ECONNRESET). A loopback connect costs far
 * less than a millisecond.
 */
function getFresh(url: string, cookie: string): Promise<{ status: number; body: string; timing: Record<string, number> }> {
  return new Promise((resolve, reject) => {
    const req = httpGet(url, { agent: false, headers: { cookie } }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body: Buffer.concat(chunks).toString('utf8'), timing: serverTiming(String(res.headers['server-timing'] ?? '')) }));
      res.on('error', reject);
    });
    req.on('error', (err) => reject(new Error(`segments request failed: ${String(err)}`)));
  });
}

/** `a;dur=1.5, b;dur=2` -> { a: 1.5, b: 2 } */
function serverTiming(header: string): Record<string, number> {
  const out: Record<string, number> = {};
  for (const part of header.split(',')) {
    const [name, ...params] = part.trim().split(';');
    const dur = params.find((p) => p.trim().startsWith('dur='));
    if (name && dur) out[name] = Number(dur.trim().slice(4));
  }
  return out;
}

/** Medians of each Server-Timing metric over requests. */
function timingMedians(list: Array<Record<string, number>>): Record<string, number> {
  const names = [...new Set(list.flatMap((t) => Object.keys(t)))];
  return Object.fromEntries(names.map((n) => [n, stats(list.map((t) => t[n] ?? 0)).medianMs]));
}

async function change(store: UpdateStore, docId: string, doc: Y.Doc, fn: () => void): Promise<void> {
  const before = Y.encodeStateVector(doc);
  fn();
  await store.append(docId, Y.encodeStateAsUpdate(doc, before), null);
}

export async function run() {
  const dataDir = mkdtempSync(join(tmpdir(), 'gloss-bench-segments-'));
  const server = await startServer(loadConfig({ PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, LOG_LEVEL: 'error' }));
  const store = createPgUpdateStore(server.database, { compactMinBytes: 0 });
  const out: Array<Record<string, unknown> & { name: string }> = [];
  try {
    const owner = await admin.createUser(server.db, { email: 'bench.owner@example.test', name: 'Bench Owner', password: 'bench-password-1' });
    const coders: Array<{ id: string }> = [];
    for (let i = 0; i < LAYERS; i++) coders.push(await admin.createUser(server.db, { email: `bench.c${i}@example.test`, name: `Coder ${i}`, password: 'bench-password-1' }));
    const res = await fetch(`${server.url}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: server.url },
      body: JSON.stringify({ email: 'bench.owner@example.test', password: 'bench-password-1' }),
    });
    const cookie = res.headers.getSetCookie()[0]!.split(';', 1)[0]!;

    for (const size of SIZES) {
      const rand = mulberry32(20261202 + size);
      const study = await admin.createStudy(server.db, { title: `Segments ${size}`, createdBy: owner.id });
      const text = await admin.addTextFromTranscript(server.db, study.id, { title: 'Long interview', transcript: transcript(rand), sourceFormat: 'txt', createdBy: owner.id });
      const layerIds: string[] = [];
      for (const c of coders) layerIds.push(await admin.ensureLayer(server.db, study.id, text.id, c.id));

      // The stored documents, changed as people would: codes, then coding, then many corrections.
      const textDoc = await loadDoc(store, text.room);
      const cb = await loadDoc(store, study.codebookRoom);
      const layers = await Promise.all(layerIds.map((id) => loadDoc(store, id)));
      let codes: string[] = [];
      await change(store, study.codebookRoom, cb, () => {
        codes = Array.from({ length: 40 }, (_, i) => addCode(cb, { label: `code ${i}` }, { by: owner.id }));
        addExclusiveSet(cb, 'stance', codes.slice(0, 4), { by: owner.id });
      });
      const t = getText(textDoc);
      for (let k = 0; k < size / LAYERS; k++) {
        const start = Math.floor(rand() * (t.length - 400));
        const width = 30 + Math.floor(rand() * 300);
        const code = codes[Math.floor(rand() * codes.length)]!;
        layers.forEach((l) => {
          const s = Math.max(0, start + Math.floor(rand() * 20) - 10);
          addSegment(l, textDoc, { codeId: rand() < 0.2 ? codes[Math.floor(rand() * codes.length)]! : code, start: s, end: Math.min(t.length, s + width + Math.floor(rand() * 20)) });
        });
      }
      for (let i = 0; i < LAYERS; i++) await store.append(layerIds[i]!, Y.encodeStateAsUpdate(layers[i]!), null);
      await change(store, text.room, textDoc, () => {
        for (let i = 0; i < CORRECTIONS; i++) {
          const at = Math.floor(rand() * (t.length - 5));
          textDoc.transact(() => {
            t.delete(at, 1 + Math.floor(rand() * 3));
            t.insert(at, WORDS[Math.floor(rand() * WORDS.length)]!.slice(0, 1 + Math.floor(rand() * 3)));
          });
        }
      });
      await store.flush();
      note(`${size}: stored`);
      let items = 0;
      for (let n = t._start; n !== null; n = n.right) items++;
      const all = layers.flatMap((l) => listSegments(l));
      const shape = { segments: all.length, words: 30_000, characters: t.length, textItems: items };

      // Resolution: cold anchors are fresh copies (as a first read from the log gives).
      const fresh = (n?: number) => freshAnchors(all, n);
      const { cold, warm, prevCold, prevWarm } = timeResolvers(textDoc, all, 7);
      const refN = Math.min(1_000, all.length);
      const ref: number[] = [];
      for (let r = 0; r < 3; r++) {
        const segs = fresh(refN);
        ref.push(timeIt(() => segs.forEach((s) => {
          Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(s.start), textDoc, false);
          Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(s.end), textDoc, false);
        })));
      }
      const refStats = stats(ref);
      const coldStats = stats(cold);
      out.push({
        name: `segments.resolve.${size}`, ...shape, cold: coldStats, warm: stats(warm),
        reference: { name: 'one-by-one Y.createAbsolutePositionFromRelativePosition', segments: refN, ...refStats, perSegmentMs: r2(refStats.medianMs / refN) },
        ratioPerSegmentColdToReference: r2(coldStats.medianMs / all.length / (refStats.medianMs / refN)),
        previous: { name: 'previous bulk resolver (resolve-by-item.ts), interleaved', cold: stats(prevCold), warm: stats(prevWarm) },
        coldToPreviousCold: r2(coldStats.medianMs / stats(prevCold).medianMs),
        warmToPreviousWarm: r2(stats(warm).medianMs / stats(prevWarm).medianMs),
        targetMs: size === 10_000 ? 10 : undefined, loadavg1: load1(),
      });

      // Flags from scratch, and after one correction (incremental).
      const sources = layers.map((doc, i) => ({ layerId: layerIds[i]!, coder: coders[i]!.id, doc }));
      const full: number[] = [];
      let flagCount = 0;
      for (let r = 0; r < 3; r++) {
        full.push(timeIt(() => {
          const e = new FlagEngine({ textDoc, codebook: cb, layers: sources });
          flagCount = e.flags().length;
          e.destroy();
        }));
      }
      const engine = new FlagEngine({ textDoc, codebook: cb, layers: sources });
      engine.flags();
      const afterEdit: number[] = [];
      const stored = Y.encodeStateVector(textDoc);
      for (let r = 0; r < 11; r++) {
        const at = Math.floor(rand() * (t.length - 10));
        textDoc.transact(() => {
          t.delete(at, 3);
          t.insert(at, 'mended');
        });
        afterEdit.push(timeIt(() => engine.refresh()));
      }
      engine.destroy();
      const fullStats = stats(full);
      const editStats = stats(afterEdit);
      out.push({
        name: `segments.flags.${size}`, ...shape, flags: flagCount, afterOneCorrection: editStats,
        reference: { name: 'every flag from scratch (new FlagEngine)', ...fullStats },
        afterOneCorrectionToReference: r2(editStats.medianMs / fullStats.medianMs), loadavg1: load1(),
      });
      // The corrections above were local: store them so the route sees the same text.
      await store.append(text.room, Y.encodeStateAsUpdate(textDoc, stored), null);
      await store.flush();

      note(`${size}: model figures done`);
      // The route over HTTP.
      const get = async () => {
        const t0 = performance.now();
        const { status, body, timing } = await getFresh(`${server.url}/api/texts/${text.id}/segments`, cookie);
        const ms = performance.now() - t0; // the answer received; parsing it is the client's cost
        if (status !== 200) throw new Error(`segments: ${status}`);
        return { ms, count: (JSON.parse(body) as unknown[]).length, timing, bytes: body.length };
      };
      const first = await get();
      note(`${size}: first request ${Math.round(first.ms)} ms`);
      const repeat: number[] = [];
      const repeatServer: Array<Record<string, number>> = [];
      for (let r = 0; r < 9; r++) {
        const g = await get();
        repeat.push(g.ms);
        repeatServer.push(g.timing);
      }
      const afterSegment: number[] = [];
      const afterCorrection: number[] = [];
      const segmentServer: Array<Record<string, number>> = [];
      const correctionServer: Array<Record<string, number>> = [];
      for (let r = 0; r < 7; r++) {
        const i = r % LAYERS;
        const s = Math.floor(rand() * (t.length - 200));
        await change(store, layerIds[i]!, layers[i]!, () => void addSegment(layers[i]!, textDoc, { codeId: codes[r]!, start: s, end: s + 120 }));
        await store.flush();
        const gs = await get();
        afterSegment.push(gs.ms);
        segmentServer.push(gs.timing);
        const at = Math.floor(rand() * (t.length - 10));
        await change(store, text.room, textDoc, () => textDoc.transact(() => {
          t.delete(at, 3);
          t.insert(at, 'fixed');
        }));
        await store.flush();
        const gc = await get();
        afterCorrection.push(gc.ms);
        correctionServer.push(gc.timing);
      }
      const before: number[] = [];
      for (let r = 0; r < 3; r++) {
        const t0 = performance.now();
        await withDocs(store, [text.room, ...layerIds, study.codebookRoom], ([td, ...rest]) => {
          const c = rest.pop()!;
          return JSON.stringify(segmentsWithFlags(td!, c, layerIds.map((id, i) => ({ layerDocId: id, coderId: coders[i]!.id, doc: rest[i]! }))));
        });
        before.push(performance.now() - t0);
      }
      // The text cache itself, in process, against its previous way of answering (objects flagged,
      // sorted and stringified afresh, then encoded as sending a string does), interleaved on the same
      // changes; each answer checked equal. The server's own work, without access checks or HTTP.
      const q = { textId: text.id, textDocId: text.room, codebookId: study.codebookRoom, layers: layerIds.map((id, i) => ({ layerDocId: id, coderId: coders[i]!.id, roundId: null })) };
      const caches = { now: createTextCache({ store }), previous: createTextCache({ store, previous: true }) };
      await caches.now.segments(q);
      await caches.previous.segments(q);
      const ab = { segment: { now: [] as number[], previous: [] as number[] }, correction: { now: [] as number[], previous: [] as number[] } };
      const both = async (into: { now: number[]; previous: number[] }, r: number) => {
        const bodies: string[] = [];
        for (const which of r % 2 === 0 ? (['now', 'previous'] as const) : (['previous', 'now'] as const)) {
          const t0 = performance.now();
          const a = await caches[which].segments(q);
          into[which].push(performance.now() - t0);
          bodies.push(a.body.toString('utf8'));
        }
        if (bodies[0] !== bodies[1]) throw new Error('segments: the kept rows and the previous answer differ');
      };
      for (let r = 0; r < 9; r++) {
        const i = r % LAYERS;
        const s = Math.floor(rand() * (t.length - 200));
        await change(store, layerIds[i]!, layers[i]!, () => void addSegment(layers[i]!, textDoc, { codeId: codes[r]!, start: s, end: s + 120 }));
        await store.flush();
        await both(ab.segment, r);
        const at = Math.floor(rand() * (t.length - 10));
        await change(store, text.room, textDoc, () => textDoc.transact(() => {
          t.delete(at, 3);
          t.insert(at, 'fixed');
        }));
        await store.flush();
        await both(ab.correction, r);
      }
      caches.now.clear();
      caches.previous.clear();
      const abStats = (x: { now: number[]; previous: number[] }) => ({ now: stats(x.now), previous: stats(x.previous), ratio: r2(stats(x.now).medianMs / stats(x.previous).medianMs) });
      out.push({
        name: `segments.cache.${size}`, ...shape, db: 'pglite',
        afterNewSegment: abStats(ab.segment), afterCorrection: abStats(ab.correction),
        reference: { name: 'previous text cache answer (segmentsWithFlags objects + JSON.stringify + UTF-8 encoding), interleaved' },
        targetMs: 100, loadavg1: load1(),
      });
      out.push({
        name: `segments.route.${size}`, ...shape, answered: first.count, db: 'pglite',
        bodyBytes: first.bytes, firstMs: r2(first.ms), firstServerMs: first.timing,
        repeat: stats(repeat), afterNewSegment: stats(afterSegment), afterCorrection: stats(afterCorrection),
        // the server's own time (Server-Timing medians), apart from carrying the body to this in-process client
        serverMs: { repeat: timingMedians(repeatServer), afterNewSegment: timingMedians(segmentServer), afterCorrection: timingMedians(correctionServer) },
        reference: { name: 'route work before the text cache: load documents from the log + segmentsWithFlags, in process (no HTTP)', ...stats(before) },
        targetMs: 100, loadavg1: load1(),
      });
      for (const d of [textDoc, cb, ...layers]) d.destroy();
    }
    return out;
  } finally {
    await store.close();
    await server.close();
    rmSync(dataDir, { recursive: true, force: true });
  }
}
