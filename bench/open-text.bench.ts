/**
 * Opening a text with 5 layers x 2,000 segments in Chromium, at 10,000, 30,000 and 100,000 words
 * (issue 11 item 6: a curve, not a point; DESIGN §9 and issue 11 target at 30,000 words: < 1 s to
 * interactive, no task longer than 50 ms, a second open on the same device < 300 ms). A real server on a fresh PGlite folder holds the text, the layers and a 20-code codebook
 * (written as each document's first log update, as an import does); a real browser signs in and opens
 * the coding view. Figures, from navigation start, measured in the page:
 *   first_text_ms   the first turns of the transcript are on screen (performance mark)
 *   full_render_ms  every turn is rendered and every layer has arrived and been drawn (performance marks;
 *                   bars are drawn for turns near the viewport, the rest as they scroll into view)
 *   interactive_ms  full render done and no long task (> 50 ms, PerformanceObserver 'longtask') after it
 *                   for a quiet window of 500 ms: the end of the last long task, if later than full render
 *   second_*        the same page loaded again in the same browser profile (its IndexedDB copies and
 *                   HTTP cache kept), after the last cold load
 * Skipped with a record when /usr/bin/chromium is absent.
 * Each record names its reference: with BENCH_REFERENCE_DIST (another build of apps/web, say the one
 * before a change) both builds are loaded in the same run, turn about, against the same server and
 * text, and the record carries the reference's figures (`reference_*`) and the ratios; without it, the
 * figures issue 11 quotes for 30,000 words on the code before the opening request.
 * Knobs: BENCH_RUNS (cold page loads per size, default 2), BENCH_WORDS (sizes, default 10000,30000,100000), BENCH_WEB_DIST (another build, for side-by-side runs),
 * BENCH_REFERENCE_DIST (a reference build loaded alongside, as above),
 * BENCH_DEBUG (per load: marks, resources, long tasks, and from the DevTools protocol when each
 * WebSocket handshake was asked and answered and when each frame arrived), BENCH_PROFILE (CPU profile;
 * BENCH_PROFILE_OUT=<folder> also writes each load's whole profile there).
 */
import { existsSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as Y from 'yjs';
import { chromium, type BrowserContext, type Page } from '@playwright/test';
import { documents, updates } from '@gloss/db';
import { addCode, addSegment, createCodebookDoc, newLayerDoc } from '@gloss/model';
import { admin, loadConfig, startServer } from '@gloss/server';

const CHROMIUM = '/usr/bin/chromium';
/** BENCH_WORDS: the text sizes of the curve (comma-separated). */
const SIZES = (process.env.BENCH_WORDS ?? '10000,30000,100000').split(',').map(Number).filter((n) => n > 0);
const LAYERS = 5;
const SEGMENTS = 2_000;
/** BENCH_RUNS: more page loads per run, for steadier medians on a loaded machine. */
const RUNS = Number(process.env.BENCH_RUNS) || 2;

/** Deterministic invented words (mulberry32), so every run opens the same text. */
function rng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const VOCAB = 'we the hall film night tea rota volunteer projector ticket door money season friends kettle screen chair committee grant bus late quiet always never maybe honestly people work paid staff trust keys'.split(' ');

function transcript(rand: () => number, WORDS: number) {
  const turns = [];
  let words = 0;
  let t = 0;
  while (words < WORDS) {
    const n = 40 + Math.floor(rand() * 120);
    const text = Array.from({ length: n }, () => VOCAB[Math.floor(rand() * VOCAB.length)]).join(' ') + '.';
    turns.push({ speaker: turns.length % 2 ? 'P01' : 'I', startMs: t, endMs: null, text });
    t += 5_000 + Math.floor(rand() * 40_000);
    words += n;
  }
  return { title: `Long interview, ${WORDS} words (benchmark)`, turns };
}

const OBSERVE_LONG_TASKS = `
  window.__long = [];
  new PerformanceObserver(function (l) {
    l.getEntries().forEach(function (e) { window.__long.push({ start: e.startTime, end: e.startTime + e.duration }); });
  }).observe({ type: 'longtask', buffered: true });`;

/** Waits for a 500 ms window without long tasks after full render, then reads the figures. */
const MEASURE = `(async function () {
  function mark(n) { var e = performance.getEntriesByName(n)[0]; return e ? e.startTime : NaN; }
  function lastEnd() { return window.__long.reduce(function (m, l) { return Math.max(m, l.end); }, 0); }
  function full() { return Math.max(mark('gloss:transcript-complete'), mark('gloss:layers-drawn')); }
  while (!(full() >= 0) || performance.now() - Math.max(lastEnd(), full()) < 500) {
    await new Promise(function (r) { setTimeout(r, 100); });
  }
  var done = full();
  return {
    first: mark('gloss:transcript-first'),
    full: done,
    interactive: Math.max(done, lastEnd()),
    longest: window.__long.reduce(function (m, l) { return Math.max(m, l.end - l.start); }, 0),
    bars: document.querySelectorAll('.transcript .seg-line').length,
    marks: performance.getEntriesByType('mark').filter(function (m) { return m.name.indexOf('gloss:') === 0; }).map(function (m) { return m.name + '=' + Math.round(m.startTime); }).join(' '),
    resources: performance.getEntriesByType('resource').map(function (r) { return r.name.replace(location.origin, '') + '=' + Math.round(r.startTime) + '..' + Math.round(r.responseEnd); }).join(' '),
    long: window.__long.map(function (l) { return Math.round(l.start) + '+' + Math.round(l.end - l.start); }).join(' '),
  };
})()`;

interface Figures { first: number; full: number; interactive: number; longest: number; bars: number; marks: string; long: string }

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  if (!existsSync(CHROMIUM)) return [{ name: 'open-text', skipped: 'no chromium' }];
  // BENCH_WEB_DIST: another build of the app (say, the one before a change) for a side-by-side run
  const webDist = process.env.BENCH_WEB_DIST ?? fileURLToPath(new URL('../apps/web/dist', import.meta.url));
  if (!existsSync(join(webDist, 'index.html'))) throw new Error('apps/web/dist is missing: run `pnpm --filter @gloss/web build` first');

  const dataDir = mkdtempSync(join(tmpdir(), 'gloss-bench-open-'));
  // BENCH_REFERENCE_DIST: the build to compare with, loaded turn about with this one in the same run
  const referenceDist = process.env.BENCH_REFERENCE_DIST;
  if (referenceDist && !existsSync(join(referenceDist, 'index.html'))) throw new Error(`BENCH_REFERENCE_DIST has no index.html: ${referenceDist}`);
  const builds = [{ name: 'candidate', dist: webDist }, ...(referenceDist ? [{ name: 'reference', dist: referenceDist }] : [])];
  // the server serves a symlink, pointed at one build before each load (it reads its files per request)
  const servedDir = mkdtempSync(join(tmpdir(), 'gloss-bench-web-'));
  const served = join(servedDir, 'dist');
  const serve = (dist: string) => {
    rmSync(served, { force: true });
    symlinkSync(dist, served);
  };
  serve(webDist);
  const env: NodeJS.ProcessEnv = { ...process.env, PORT: '0', DATA_DIR: dataDir, LOG_LEVEL: 'warn', WEB_DIST: served };
  delete env.DATABASE_URL;
  delete env.REDIS_URL;
  delete env.PUBLIC_URL;
  const server = await startServer(loadConfig(env));
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    const db = server.db;
    const rand = rng(20260101);
    const coders: Array<{ id: string }> = [];
    for (let i = 0; i < LAYERS; i++) coders.push(await admin.createUser(db, { email: `bench${i}@example.org`, name: `Bench Coder ${i + 1}`, password: 'bench-password-1' }));
    const study = await admin.createStudy(db, { title: 'Benchmark study', createdBy: coders[0]!.id });
    for (const c of coders.slice(1)) await admin.addMember(db, study.id, c.id, 'coder');
    const cb = createCodebookDoc();
    const codeIds = Array.from({ length: 20 }, (_, i) => addCode(cb, { label: `Code ${i + 1}`, briefDefinition: `Benchmark code ${i + 1}.` }, { by: coders[0]!.id }));
    const cbRow = (await db.select().from(documents)).find((d) => d.studyId === study.id && d.kind === 'codebook');
    const cbUpdate = Y.encodeStateAsUpdate(cb);
    await db.insert(updates).values({ docId: cbRow!.id, data: cbUpdate, bytes: cbUpdate.byteLength, userId: coders[0]!.id });

    const records: Array<Record<string, unknown> & { name: string }> = [];
    for (const words of SIZES) {
      const t0 = performance.now();
      const t = transcript(rand, words);
      const text = await admin.addTextFromTranscript(db, study.id, { title: t.title, transcript: t, sourceFormat: 'api', createdBy: coders[0]!.id });
      // the text document exactly as stored, to anchor the layers' segments into
      const textDoc = new Y.Doc({ gc: false });
      // (few rows exist yet: filtering in JS keeps this file free of a query-builder import)
      const first = (await db.select().from(updates)).find((u) => u.docId === text.room);
      Y.applyUpdate(textDoc, first!.data);
      const length = textDoc.getText('text').length;
      let layerBytes = 0;
      for (const c of coders) {
        const layerId = await admin.ensureLayer(db, study.id, text.id, c.id);
        const layer = newLayerDoc();
        layer.transact(() => {
          for (let i = 0; i < SEGMENTS; i++) {
            const start = Math.floor(rand() * (length - 400));
            addSegment(layer, textDoc, { codeId: codeIds[Math.floor(rand() * codeIds.length)]!, start, end: start + 15 + Math.floor(rand() * 300) });
          }
        });
        const u = Y.encodeStateAsUpdate(layer);
        layerBytes = u.byteLength;
        await db.insert(updates).values({ docId: layerId, data: u, bytes: u.byteLength, userId: c.id });
      }
      const seeded_s = (performance.now() - t0) / 1000;
      // the server's rooms loaded once before any measured load (each opening keeps them 30 s), so the
      // build measured first does not pay alone for loading them from the database
      {
        const warmup = await browser.newContext({ baseURL: server.url });
        await warmup.request.post('/api/session', { data: { email: 'bench0@example.org', password: 'bench-password-1' }, headers: { origin: server.url } });
        const w = await warmup.request.get(`/api/texts/${text.id}/opening`);
        if (!w.ok()) throw new Error(`warm-up opening failed: ${w.status()}`);
        await warmup.close();
      }
      const cold = new Map<string, Figures[]>(builds.map((b) => [b.name, []]));
      const warm = new Map<string, Figures>();
      for (let r = 0; r < RUNS; r++) {
        for (const build of builds) {
          serve(build.dist);
          const context = await browser.newContext({ baseURL: server.url, viewport: { width: 1400, height: 900 } });
          const res = await context.request.post('/api/session', { data: { email: 'bench0@example.org', password: 'bench-password-1' }, headers: { origin: server.url } });
          if (!res.ok()) throw new Error(`sign-in failed: ${res.status()}`);
          await context.addInitScript(OBSERVE_LONG_TASKS);
          const page = await context.newPage();
          cold.get(build.name)!.push(await load(context, page, `/#/study/${study.id}/text/${text.id}`, `${build.name}, ${words} words, cold load ${r + 1}`));
          // the second open on this device: the same profile, its IndexedDB copies and HTTP cache kept
          if (r === RUNS - 1) warm.set(build.name, await load(context, page, 'reload', `${build.name}, ${words} words, second open`));
          await context.close();
        }
      }
      const figures = (build: string, prefix: string) => {
        const runs = cold.get(build)!;
        const median = (k: 'first' | 'full' | 'interactive' | 'longest') => [...runs.map((s) => s[k])].sort((a, b) => a - b)[Math.floor(runs.length / 2)]!;
        const w = warm.get(build)!;
        return {
          [`${prefix}first_text_ms`]: Math.round(median('first')),
          [`${prefix}full_render_ms`]: Math.round(median('full')),
          [`${prefix}interactive_ms`]: Math.round(median('interactive')),
          [`${prefix}longest_task_ms`]: Math.round(median('longest')),
          [`${prefix}second_first_text_ms`]: Math.round(w.first),
          [`${prefix}second_interactive_ms`]: Math.round(w.interactive),
          [`${prefix}second_longest_task_ms`]: Math.round(w.longest),
        } as Record<string, number>;
      };
      const mine = figures('candidate', '');
      const reference: Record<string, unknown> = referenceDist
        ? (() => {
            const ref = figures('reference', 'reference_');
            const ratio = (k: string) => Math.round((mine[k]! / Math.max(1, ref[`reference_${k}`]!)) * 100) / 100;
            return {
              reference: `the build at ${referenceDist}, loaded turn about in this run`,
              ...ref,
              ratio_interactive: ratio('interactive_ms'),
              ratio_longest_task: ratio('longest_task_ms'),
              ratio_second_interactive: ratio('second_interactive_ms'),
            };
          })()
        : { reference: 'issue 11, 30,000 words, before the opening request: first text 1200 ms, interactive 3300 ms, longest task 345 ms', reference_interactive_ms_30k: 3300, reference_first_text_ms_30k: 1200, reference_longest_task_ms_30k: 345 };
      records.push({
        name: `open-text-${Math.round(words / 1000)}k-words-5x2000-segments`,
        words,
        characters: length,
        layers: LAYERS,
        segments_per_layer: SEGMENTS,
        layer_state_kb: Math.round(layerBytes / 1024),
        runs: RUNS,
        ...mine,
        target_ms: 1000,
        target_second_ms: 300,
        target_longest_task_ms: 50,
        ...reference,
        setup_s: Math.round(seeded_s * 10) / 10,
      });
    }
    return records;
  } finally {
    await browser.close();
    await server.close();
    rmSync(dataDir, { recursive: true, force: true });
    rmSync(servedDir, { recursive: true, force: true });
  }
}

/** One page load (a URL, or 'reload' for the same page again), measured after a quiet window; BENCH_DEBUG and BENCH_PROFILE print to stderr. */
async function load(context: BrowserContext, page: Page, url: string, what: string): Promise<Figures> {
  const cdp = process.env.BENCH_PROFILE || process.env.BENCH_DEBUG ? await context.newCDPSession(page) : undefined;
  // BENCH_DEBUG: when the network layer got each sync frame (before the page's main thread saw it)
  const frames: string[] = [];
  if (cdp && process.env.BENCH_DEBUG) {
    const rooms = new Map<string, string>();
    let wall0 = 0;
    cdp.on('Network.webSocketCreated', (e: { requestId: string; url: string }) => rooms.set(e.requestId, e.url.split('/').pop()!.slice(0, 6)));
    cdp.on('Network.webSocketFrameReceived', (e: { requestId: string; timestamp: number; response: { payloadData: string } }) => {
      wall0 ||= e.timestamp;
      frames.push(`${rooms.get(e.requestId)}:${Math.round((e.timestamp - wall0) * 1000)}:${Math.round(e.response.payloadData.length * 0.75 / 1024)}k`);
    });
    cdp.on('Network.webSocketWillSendHandshakeRequest', (e: { requestId: string; timestamp: number }) => {
      wall0 ||= e.timestamp;
      frames.push(`${rooms.get(e.requestId)}:${Math.round((e.timestamp - wall0) * 1000)}:ask`);
    });
    cdp.on('Network.webSocketHandshakeResponseReceived', (e: { requestId: string; timestamp: number }) => frames.push(`${rooms.get(e.requestId)}:${Math.round((e.timestamp - wall0) * 1000)}:open`));
    await cdp.send('Network.enable');
  }
  if (cdp && process.env.BENCH_PROFILE) {
    await cdp.send('Profiler.enable');
    await cdp.send('Profiler.start');
  }
  if (url === 'reload') await page.reload();
  else await page.goto(url);
  await page.waitForSelector('[data-testid="coding-view"][data-ready="yes"]', { timeout: 120_000 });
  // wait for a quiet window of 500 ms with no long task, then read the figures
  // (a string, not a function: the TypeScript runner would add helpers the page does not have)
  const figures = (await page.evaluate(MEASURE)) as Figures;
  if (cdp && process.env.BENCH_PROFILE) {
    const { profile } = (await cdp.send('Profiler.stop')) as { profile: { nodes: Array<{ id: number; callFrame: { functionName: string; url: string; lineNumber: number } }>; samples: number[]; timeDeltas: number[] } };
    // BENCH_PROFILE_OUT: a folder for the whole profile (.cpuprofile, opens in Chromium's DevTools)
    if (process.env.BENCH_PROFILE_OUT) writeFileSync(join(process.env.BENCH_PROFILE_OUT, `${what.replace(/[^a-z0-9]+/gi, '-')}.cpuprofile`), JSON.stringify(profile));
    const self = new Map<string, number>();
    const byId = new Map(profile.nodes.map((n) => [n.id, n]));
    profile.samples.forEach((id, i) => {
      const n = byId.get(id)!;
      const key = `${n.callFrame.functionName || '(anon)'} ${n.callFrame.url.split('/').pop()}:${n.callFrame.lineNumber}`;
      self.set(key, (self.get(key) ?? 0) + (profile.timeDeltas[i] ?? 0) / 1000);
    });
    process.stderr.write(`-- CPU profile, ${what} (self time, top)\n` + [...self].sort((a, b) => b[1] - a[1]).slice(0, Number(process.env.BENCH_PROFILE_TOP) || 25).map(([k, v]) => `${v.toFixed(0).padStart(6)} ms  ${k}`).join('\n') + '\n');
  }
  if (process.env.BENCH_DEBUG) process.stderr.write(JSON.stringify({ what, ...figures, frames: frames.join(' ') }) + '\n');
  await cdp?.detach();
  if (figures.bars === 0) throw new Error(`${what}: no segment bars were drawn`);
  return figures;
}
