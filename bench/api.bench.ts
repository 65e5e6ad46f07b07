/**
 * HTTP API figures for the composed server on embedded PGlite (in-process, one node):
 * - sign-in latency (argon2id m=19456 t=2 p=1 dominates; OWASP's setting, so ~20–40 ms is expected);
 * - an authenticated read (GET /api/studies/:id: session lookup with sliding check, membership, study
 *   and its documents) and the texts list, sequential and 16 in flight.
 * No reference exists for these; they are here to catch regressions. Each record carries the 1-minute
 * load average, since the machine is shared.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import { admin, loadConfig, startServer } from '@gloss/server';

function stats(ms: number[]) {
  const s = [...ms].sort((a, b) => a - b);
  const q = (p: number) => Math.round(s[Math.min(s.length - 1, Math.floor(p * s.length))]! * 100) / 100;
  return { n: s.length, p50Ms: q(0.5), p95Ms: q(0.95), p99Ms: q(0.99) };
}

export async function run() {
  const dataDir = mkdtempSync(join(tmpdir(), 'gloss-bench-api-'));
  const server = await startServer(loadConfig({ PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, LOG_LEVEL: 'error' }));
  try {
    const user = await admin.createUser(server.db, { email: 'bench@example.test', name: 'Bench Coder', password: 'bench-password' });
    const study = await admin.createStudy(server.db, { title: 'Bench study', createdBy: user.id });
    for (let i = 0; i < 20; i++) {
      await admin.addTextFromTranscript(server.db, study.id, {
        title: `Text ${i}`,
        transcript: { turns: [{ speaker: 'P01', startMs: null, endMs: null, text: 'An invented answer about the harbour. '.repeat(50) }] },
        sourceFormat: 'txt',
        createdBy: user.id,
      });
    }
    const origin = server.url;
    const signInOnce = async () => {
      const res = await fetch(`${server.url}/api/session`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', origin },
        body: JSON.stringify({ email: 'bench@example.test', password: 'bench-password' }),
      });
      if (res.status !== 200) throw new Error(`sign-in ${res.status}`);
      return res.headers.getSetCookie()[0]!.split(';', 1)[0]!;
    };
    const signIns: number[] = [];
    let cookie = '';
    for (let i = 0; i < 10; i++) {
      const t0 = performance.now();
      cookie = await signInOnce();
      signIns.push(performance.now() - t0);
    }
    const get = async (path: string) => {
      const t0 = performance.now();
      const res = await fetch(`${server.url}${path}`, { headers: { cookie } });
      await res.arrayBuffer();
      if (res.status !== 200) throw new Error(`${path}: ${res.status}`);
      return performance.now() - t0;
    };
    const sequential = async (path: string, n: number) => {
      const ms: number[] = [];
      for (let i = 0; i < n; i++) ms.push(await get(path));
      return ms;
    };
    const concurrent = async (path: string, n: number, inFlight: number) => {
      const ms: number[] = [];
      const t0 = performance.now();
      let next = 0;
      await Promise.all(
        Array.from({ length: inFlight }, async () => {
          while (next < n) {
            next++;
            ms.push(await get(path));
          }
        }),
      );
      return { ms, perSecond: Math.round((n / (performance.now() - t0)) * 1000) };
    };
    const studyPath = `/api/studies/${study.id}`;
    const textsPath = `/api/studies/${study.id}/texts`;
    await sequential(studyPath, 30); // warm-up
    const studySeq = await sequential(studyPath, 200);
    const textsSeq = await sequential(textsPath, 150);
    const studyConc = await concurrent(studyPath, 300, 16);
    // The machine is shared: the 1-minute load average says how much to trust the figures.
    const load1 = Math.round(loadavg()[0]! * 100) / 100;
    return [
      { name: 'api sign-in (argon2id verify + session insert)', db: 'pglite', load1, ...stats(signIns) },
      { name: 'api GET study, sequential', db: 'pglite', load1, ...stats(studySeq) },
      { name: 'api GET texts list (20 texts), sequential', db: 'pglite', load1, ...stats(textsSeq) },
      { name: 'api GET study, 16 in flight', db: 'pglite', load1, ...stats(studyConc.ms), requestsPerSecond: studyConc.perSecond },
    ];
  } finally {
    await server.close();
    rmSync(dataDir, { recursive: true, force: true });
  }
}
