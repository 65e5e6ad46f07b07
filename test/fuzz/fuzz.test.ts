/**
 * The short seeded fuzz run that CI runs (issue 13 item 10; the long one is `pnpm fuzz`): a few
 * thousand hostile messages at a real server process while a well-behaved client edits. The server
 * stays up, answers no hostile message with an internal error, and the well-behaved clients converge.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { runFuzz, seedFuzzWorld, type FuzzWorld } from './fuzz-run.js';

describe('fuzz (short, seeded)', () => {
  let server: SpawnedServer<FuzzWorld>;
  beforeAll(async () => {
    server = await spawnServer({ db: 'pglite', seed: seedFuzzWorld });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('survives 3,000 hostile messages; the writer, the reader and a newcomer agree', async () => {
    const report = await runFuzz({ url: server.url, world: server.seeded, seed: 20261202, messages: 3_000, concurrency: 4 });
    expect(report.sent).toBe(3_000);
    expect(Object.keys(report.byKind).length).toBeGreaterThanOrEqual(10);
    // Bad input closes its own connection with a protocol code, never an internal error.
    expect(report.closeCodes['1011']).toBeUndefined();
    expect(Object.keys(report.refusedUpgrades).every((status) => status === '403' || status === '404')).toBe(true);
    const health = await fetch(`${server.url}/api/health`);
    expect(health.status).toBe(200);
    expect(server.pid).toBeDefined();
  }, 300_000);
});
