/**
 * The PostgreSQL driver (postgres.js 3.4.9, patched: patches/postgres@3.4.9.patch) when the server ends
 * a connection in the middle of a transaction, as `pg_ctl stop -m fast` or an administrator's
 * pg_terminate_backend does. Unpatched, the transaction's next statement was written to the closed
 * socket on the next tick: an uncaught TypeError that ended the whole server process (seen in CI,
 * test/faults/postgres-restart.test.ts). Vitest fails a run on any uncaught error, so this test also
 * fails if that crash comes back. Needs DATABASE_URL (CI sets it: then this runs, never skips).
 */
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
