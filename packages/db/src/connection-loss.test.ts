/**
 * The PostgreSQL driver (postgres.js 3.4.9, patched: patches/postgres@3.4.9.patch) when the server ends
 * a connection in the middle of a transaction, as `pg_ctl stop -m fast` or an administrator's
 * pg_terminate_backend does. Unpatched, the transaction's next statement was written to the closed
 * socket on the next tick: an uncaught TypeError that ended the whole server process (seen in CI,
 * test/faults/postgres-restart.test.ts). Vitest fails a run on any uncaught error, so this test also
 * fails if that crash comes back. Needs DATABASE_URL (CI sets it: then this runs, never skips).
 * The second case: the driver reads the server's array types on every new connection, and that read
 * had no rejection handler, so a connection lost during it ended the process too.
 */
import { connect, createServer, type AddressInfo, type Socket } from 'node:net';
import postgres from 'postgres';
import { afterAll, describe, expect, it } from 'vitest';

const url = process.env.DATABASE_URL;

describe.runIf(Boolean(url))('a connection ended by the server mid-transaction', () => {
  const sql = postgres(url!, { max: 2, onnotice: () => undefined });
  const admin = postgres(url!, { max: 1, onnotice: () => undefined });
  afterAll(async () => {
    await sql.end({ timeout: 5 });
    await admin.end({ timeout: 5 });
  });

  it("refuses the transaction's next statement with CONNECTION_CLOSED, and the pool serves the next query", async () => {
    let open!: () => void;
    const transactionEnded = new Promise<void>((resolve) => (open = resolve));
    let lateStatement: Promise<unknown> | undefined;
    const transaction = sql.begin(async (tx) => {
      const [row] = await tx<{ pid: number }[]>`select pg_backend_pid() as pid`;
      await admin`select pg_terminate_backend(${row!.pid})`;
      // The driver rejects the transaction as soon as the socket closes; this statement comes after.
      await transactionEnded;
      lateStatement = tx`select 1`;
      await lateStatement;
    });
    await expect(transaction).rejects.toMatchObject({ code: 'CONNECTION_CLOSED' });
    open();
    await expect.poll(() => lateStatement !== undefined).toBe(true);
    await expect(lateStatement).rejects.toMatchObject({ code: 'CONNECTION_CLOSED' });
    const [after] = await sql<{ answer: number }[]>`select 41 + 1 as answer`;
    expect(after!.answer).toBe(42);
  });
});

describe.runIf(Boolean(url))('a connection lost while the driver reads its array types', () => {
  it('does not end the process: the waiting query fails with the connection error, the next one goes through', async () => {
    const target = new URL(url!);
    let cut = 0;
    // A TCP relay to PostgreSQL that resets the first connection whose client sends the driver's types query.
    const relay = createServer((client: Socket) => {
      const server = connect(Number(target.port || 5432), target.hostname);
      client.on('error', () => server.destroy());
      server.on('error', () => client.destroy());
      server.pipe(client);
      client.on('data', (chunk: Buffer) => {
        if (cut === 0 && chunk.includes('typcategory')) {
          cut++;
          client.resetAndDestroy(); // a reset, as a server that went away mid-read gives (ECONNRESET)
          server.destroy();
          return;
        }
        server.write(chunk);
      });
    });
    await new Promise<void>((resolve) => relay.listen(0, '127.0.0.1', resolve));
    const via = new URL(url!);
    via.hostname = '127.0.0.1';
    via.port = String((relay.address() as AddressInfo).port);
    const sql = postgres(via.toString(), { max: 1, onnotice: () => undefined });
    try {
      // The query that opened the connection fails with the connection's error, told to its caller...
      await expect(sql`select 1`).rejects.toMatchObject({ code: 'ECONNRESET' });
      expect(cut).toBe(1);
      // ...and the next one goes through on a new connection.
      const [row] = await sql<{ answer: number }[]>`select 41 + 1 as answer`;
      expect(row!.answer).toBe(42);
    } finally {
      await sql.end({ timeout: 5 });
      await new Promise<void>((resolve) => relay.close(() => resolve()));
    }
  });
});
