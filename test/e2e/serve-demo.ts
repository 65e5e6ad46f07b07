/**
 * Starts a real Gloss server for the browser tests: a fresh temporary data folder (embedded PGlite),
 * the invented demo study seeded, the built web app served at `/`. PORT comes from the environment.
 * Prints the same `{"event":"listening",…}` line as the server's main.ts; removes its folder on exit.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { admin, loadConfig, seedDemo, startServer } from '../../apps/server/src/index.js';
import { EXTRA } from './round-people.js';

const dataDir = mkdtempSync(join(tmpdir(), 'gloss-e2e-'));
const env: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: dataDir, LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn', WEB_DIST: fileURLToPath(new URL('../../apps/web/dist', import.meta.url)) };
// Browser tests own their database: never the shared PostgreSQL or Redis of other suites.
delete env.DATABASE_URL;
delete env.REDIS_URL;
delete env.PUBLIC_URL;

let seeded: Awaited<ReturnType<typeof seedDemo>> | undefined;
// Seeding is the server's start-up step, so /api/health (which Playwright waits for) answers ok only after it.
const server = await startServer(loadConfig(env), undefined, {
  prepare: {
    what: 'demo study seeding',
    async run(db) {
      seeded = await seedDemo(db);
      // An invented extra coder with an account but no study: the calibration-round test (rounds.spec.ts)
      // makes them a member of the demo study through the members screen, as a lead would.
      await admin.createUser(db, { email: EXTRA.email, password: EXTRA.password, name: EXTRA.name });
    },
  },
});
process.stdout.write(JSON.stringify({ event: 'listening', url: server.url, port: server.port, seeded: seeded!.seeded, studyId: seeded!.studyId }) + '\n');

let stopping = false;
const stop = () => {
  if (stopping) process.exit(1);
  stopping = true;
  void server.close().finally(() => {
    rmSync(dataDir, { recursive: true, force: true });
    process.exit(0);
  });
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
