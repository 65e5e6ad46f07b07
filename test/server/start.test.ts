/** Starting the server process: bad configuration and an unreachable database stop it with a clear message. */
import { describe, expect, it } from 'vitest';
import { spawnServer } from '../support/server.js';

describe('server start', () => {
  it('exits with a message naming the variable when the configuration is bad', async () => {
    const err = await spawnServer({ db: 'pglite', env: { PORT: 'eighty' } }).catch((e: unknown) => e as Error);
    expect(err).toBeInstanceOf(Error);
    expect((err as Error).message).toMatch(/exited \(2\)/);
    expect((err as Error).message).toContain('PORT must be an integer');
  }, 90_000); // a cold process start: 10 s seen here under load

  it('exits with a message when PostgreSQL cannot be reached', async () => {
    const err = await spawnServer({ db: 'pglite', env: { DATABASE_URL: 'postgres://nobody@127.0.0.1:1/none' } }).catch((e: unknown) => e as Error);
    expect(err).toBeInstanceOf(Error);
    expect((err as Error).message).toMatch(/exited \(1\)/);
    expect((err as Error).message).toContain('could not start: PostgreSQL connection failed');
  }, 90_000);
});
