/**
 * `pnpm fuzz`: the long fuzz run (issue 13 item 10). A real server process (PGlite; FUZZ_DB=postgres
 * with DATABASE_URL for PostgreSQL) receives FUZZ_MESSAGES (default 100,000) seeded hostile messages
 * (FUZZ_SEED) while a well-behaved writer edits and a reader follows (fuzz-run.ts). The server's
 * resident memory is read from /proc every 500 ms; the run prints one JSON report with its start,
 * peak and end, and exits 1 if the server died or the well-behaved clients did not converge.
 */
import { readFileSync } from 'node:fs';
import { spawnServer } from '../support/server.js';
import { runFuzz, seedFuzzWorld } from './fuzz-run.js';

const messages = Number(process.env.FUZZ_MESSAGES ?? 100_000);
const seed = Number(process.env.FUZZ_SEED ?? 13);
const db = process.env.FUZZ_DB === 'postgres' ? 'postgres' : 'pglite';

const rssMb = (pid: number): number => {
  const kb = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? 0);
  return Math.round((kb / 1024) * 10) / 10;
};

const server = await spawnServer({ db, seed: seedFuzzWorld, env: { LOG_LEVEL: 'error' } });
const pid = server.pid!;
const samples: number[] = [rssMb(pid)];
const sampler = setInterval(() => samples.push(rssMb(pid)), 500);
let failure: unknown = null;
let report: Awaited<ReturnType<typeof runFuzz>> | null = null;
try {
  report = await runFuzz({
    url: server.url,
    world: server.seeded,
    seed,
    messages,
    concurrency: 8,
    onProgress: (sent) => process.stderr.write(`fuzz: ${sent} sent, rss ${samples.at(-1)} MB\n`),
  });
} catch (error) {
  failure = error;
}
clearInterval(sampler);
// A few seconds with nobody connected, so the end figure is the server at rest again.
for (let i = 0; i < 5; i++) {
  await new Promise((resolve) => setTimeout(resolve, 1_000));
  samples.push(rssMb(pid));
}
const health = await fetch(`${server.url}/api/health`).then((r) => r.status, () => 0);
await server.stop();
process.stdout.write(
  JSON.stringify({
    name: 'fuzz',
    db,
    seed,
    ...report,
    serverUpAfter: health === 200,
    rssMb: { start: samples[0], peak: Math.max(...samples), end: samples.at(-1), samples: samples.length },
    error: failure === null ? undefined : String((failure as Error)?.stack ?? failure),
  }) + '\n',
);
process.exit(failure === null && health === 200 ? 0 : 1);
