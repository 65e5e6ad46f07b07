/**
 * One multi-row INSERT for a batch of log rows, with a fixed number of parameters: the updates travel
 * as one concatenated bytea plus offset/length arrays and are cut apart by the database. (Building a
 * 1,000-row VALUES list through the query builder cost ~60 ms of CPU here; this costs well under 1.)
 * Batches of up to 32 rows use a plain VALUES list instead, which plans cheaper.
 *
 * Every form inserts only rows whose document still exists, checked in the same statement under a
 * FOR KEY SHARE lock on the documents rows (the `live` CTE): a purge or deletion that removes a
 * document either waits for this commit and then takes its rows with it (the foreign key cascades),
 * or has committed first, and then the row is refused here (null) instead of failing the whole batch.
 * So no append, however late, lands in a retired document after the purge (DESIGN §8).
 */
import { rowsOf, type Db } from '@gloss/db';
import { sql } from 'drizzle-orm';
import { StoreError } from './errors.js';
import { isUuid } from '../ids.js';
import { insertPrepared, isPgliteWireClient, PREPARED_MAX, WireError } from './pglite-prepared.js';

export interface LogRow {
  docId: string;
  data: Uint8Array;
  userId: string | null;
}


/** The embedded database's own client, reached past drizzle (drizzle keeps it as `$client`). */
interface SimpleQueryClient {
  exec(query: string): Promise<Array<{ rows: unknown[] }>>;
}

/** PGlite's client under `db`, or null (PostgreSQL, or a drizzle without `$client`). */
export function pgliteClientOf(db: Db): SimpleQueryClient | null {
  const client = (db as unknown as { $client?: Partial<SimpleQueryClient> & { dataDir?: unknown; waitReady?: unknown } }).$client;
  return client !== undefined && typeof client.exec === 'function' && 'waitReady' in client ? (client as SimpleQueryClient) : null;
}

/** Largest batch sent as literals on PGlite; larger ones take the unnest statement below. */
const LITERAL_BATCH = 256;

/**
 * Inserts the rows in order; returns their seqs in the same order, null for a row whose document is
 * gone (deleted or retired). On PGlite (`pglite` given) a
 * batch goes as one simple-protocol statement with the values written as literals: no parse/bind
 * round and no query builder, which measured 2-3x less CPU per commit than the parameterised
 * statement through drizzle (0.7 vs 1.7-3.3 ms for one row, issue 11). Safe as literals because the
 * ids are checked UUIDs and the bytes are hex digits.
 */
export async function insertBatch(db: Db, rows: readonly LogRow[], pglite: SimpleQueryClient | null = null): Promise<Array<number | null>> {
  if (pglite !== null && rows.length <= LITERAL_BATCH) return insertLiterals(pglite, rows);
  const blob = Buffer.allocUnsafe(rows.reduce((n, row) => n + row.data.length, 0));
  const offsets: number[] = [];
  const lengths: number[] = [];
  let offset = 0;
  for (const row of rows) {
    // Ids go into array literals below, so they must be plain UUIDs.
    if (!isUuid(row.docId) || (row.userId !== null && !isUuid(row.userId))) {
      throw new StoreError('append-failed', `not a UUID: ${row.docId} / ${row.userId}`);
    }
    blob.set(row.data, offset);
    offsets.push(offset);
    lengths.push(row.data.length);
    offset += row.data.length;
  }
  if (rows.length <= SMALL_BATCH) return insertValues(db, rows);
  const docIds = `{${rows.map((row) => row.docId).join(',')}}`;
  const userIds = `{${rows.map((row) => row.userId ?? 'NULL').join(',')}}`;
  const result = await db.execute(sql`
    with live as (select id from documents where id = any(${docIds}::uuid[]) for key share)
    insert into updates (doc_id, data, bytes, user_id)
    select d.doc_id, substring(${blob}::bytea from d.off + 1 for d.len), d.len, d.user_id
    from unnest(${docIds}::uuid[], ${`{${offsets.join(',')}}`}::int[], ${`{${lengths.join(',')}}`}::int[], ${userIds}::uuid[])
      with ordinality as d(doc_id, off, len, user_id, n)
    where d.doc_id in (select id from live)
    order by d.n
    returning seq, doc_id`);
  return seqsOf(result, rows);
}

async function insertLiterals(client: SimpleQueryClient, rows: readonly LogRow[]): Promise<Array<number | null>> {
  for (const row of rows) {
    if (!isUuid(row.docId) || (row.userId !== null && !isUuid(row.userId))) {
      throw new StoreError('append-failed', `not a UUID: ${row.docId} / ${row.userId}`);
    }
  }
  // Up to PREPARED_MAX rows: the same plain INSERT, prepared once per size (pglite-prepared.ts).
  if (rows.length <= PREPARED_MAX && isPgliteWireClient(client)) {
    try {
      return seqsOf(await insertPrepared(client, rows), rows);
    } catch (error) {
      if (!(error instanceof WireError) || !isForeignKeyViolation(error)) throw error;
      return insertFiltered(client, rows, literalValues(rows));
    }
  }
  const values = literalValues(rows);
  // The usual case, every document there: a plain INSERT … VALUES, which plans in a fraction of the
  // filtered INSERT … SELECT below (PGlite: ~0.3 vs ~0.8 ms of this process's CPU for one row, issue 11).
  // The foreign key still checks each document (under the same FOR KEY SHARE lock the `live` CTE
  // takes), so a gone document fails the statement whole, nothing inserted; only then is the batch
  // sent again filtered, so that row is refused alone. PGlite runs one statement at a time and this
  // client is never inside a transaction, so the failed try leaves nothing behind.
  let result: { rows: unknown[] } | undefined;
  try {
    [result] = await client.exec(`insert into updates (doc_id, data, bytes, user_id) values ${values.join(',')} returning seq, doc_id`);
  } catch (error) {
    if (!isForeignKeyViolation(error)) throw error;
    return insertFiltered(client, rows, values);
  }
  return seqsOf(result?.rows ?? [], rows);
}

/** The rows as VALUES literals (ids checked as UUIDs by the caller, bytes as hex digits). */
function literalValues(rows: readonly LogRow[]): string[] {
  return rows.map((row) => {
    const hex = Buffer.from(row.data.buffer, row.data.byteOffset, row.data.byteLength).toString('hex');
    return `('${row.docId}'::uuid,'\\x${hex}'::bytea,${row.data.length},${row.userId === null ? 'null' : `'${row.userId}'`}::uuid)`;
  });
}

/** The batch again, inserting only rows whose document is still there (a gone one is refused alone). */
async function insertFiltered(client: SimpleQueryClient, rows: readonly LogRow[], values: readonly string[]): Promise<Array<number | null>> {
  const numbered = values.map((v, n) => `${v.slice(0, -1)},${n})`);
  const ids = [...new Set(rows.map((row) => `'${row.docId}'`))].join(',');
  const [result] = await client.exec(
    `with live as (select id from documents where id in (${ids}) for key share) ` +
      `insert into updates (doc_id, data, bytes, user_id) select v.doc_id, v.data, v.bytes, v.user_id from (values ${numbered.join(',')}) as v(doc_id, data, bytes, user_id, n) ` +
      `where v.doc_id in (select id from live) order by v.n returning seq, doc_id`,
  );
  return seqsOf(result?.rows ?? [], rows);
}

/** postgres.js's `unsafe` as the store uses it. */
interface PostgresClient {
  unsafe(query: string, params: unknown[], options: { prepare: boolean }): Promise<unknown>;
}

/** postgres.js's client under `db` (drizzle keeps it as `$client`), or null (PGlite). */
export function postgresClientOf(db: Db): PostgresClient | null {
  const client = (db as unknown as { $client?: Partial<PostgresClient> & { reserve?: unknown } }).$client;
  return client !== undefined && typeof client.unsafe === 'function' && typeof client.reserve === 'function' ? (client as PostgresClient) : null;
}

/**
 * The batch statement of `insertBatch` for every size, written once and sent to postgres.js as a
 * named prepared statement: one text whatever the batch's size (arrays and one concatenated bytea as
 * its four parameters), so each connection parses and plans it once. Through drizzle every append
 * was built again by the query builder and sent unprepared, which postgres.js does as two round trips
 * (describe, then bind and execute) with a different text for each batch size (issue 11).
 * Same filter as insertBatch: rows whose document is gone are refused (null), under FOR KEY SHARE.
 */
const POSTGRES_APPEND = `with live as (select id from documents where id = any($1::text::uuid[]) for key share)
insert into updates (doc_id, data, bytes, user_id)
select d.doc_id, substring($2::bytea from d.off + 1 for d.len), d.len, d.user_id
from unnest($1::text::uuid[], $3::text::int[], $4::text::int[], $5::text::uuid[]) with ordinality as d(doc_id, off, len, user_id, n)
where d.doc_id in (select id from live)
order by d.n
returning seq, doc_id`;

export async function insertBatchPostgres(client: PostgresClient, rows: readonly LogRow[]): Promise<Array<number | null>> {
  let bytes = 0;
  for (const row of rows) {
    // Ids go into array literals, so they must be plain UUIDs.
    if (!isUuid(row.docId) || (row.userId !== null && !isUuid(row.userId))) {
      throw new StoreError('append-failed', `not a UUID: ${row.docId} / ${row.userId}`);
    }
    bytes += row.data.byteLength;
  }
  const blob = Buffer.allocUnsafe(bytes);
  const offsets: number[] = [];
  const lengths: number[] = [];
  let offset = 0;
  for (const row of rows) {
    blob.set(row.data, offset);
    offsets.push(offset);
    lengths.push(row.data.byteLength);
    offset += row.data.byteLength;
  }
  const result = await client.unsafe(
    POSTGRES_APPEND,
    [
      `{${rows.map((row) => row.docId).join(',')}}`,
      blob,
      `{${offsets.join(',')}}`,
      `{${lengths.join(',')}}`,
      `{${rows.map((row) => row.userId ?? 'NULL').join(',')}}`,
    ],
    { prepare: true },
  );
  return seqsOf(result, rows);
}

/** PostgreSQL's foreign_key_violation (SQLSTATE 23503), as PGlite reports it. */
function isForeignKeyViolation(error: unknown): boolean {
  return (error as { code?: unknown } | null)?.code === '23503';
}

/** Small batches (the usual case at moderate load): a plain VALUES list plans cheaper (PGlite: ~1.0 vs ~1.7 ms CPU for one row). */
const SMALL_BATCH = 32;

async function insertValues(db: Db, rows: readonly LogRow[]): Promise<Array<number | null>> {
  const values = rows.map(
    (row, n) => sql`(${row.docId}::uuid, ${Buffer.from(row.data.buffer, row.data.byteOffset, row.data.byteLength)}::bytea, ${row.data.length}::int, ${row.userId}::uuid, ${n}::int)`,
  );
  const ids = `{${[...new Set(rows.map((row) => row.docId))].join(',')}}`;
  const result = await db.execute(sql`
    with live as (select id from documents where id = any(${ids}::uuid[]) for key share)
    insert into updates (doc_id, data, bytes, user_id)
    select v.doc_id, v.data, v.bytes, v.user_id from (values ${sql.join(values, sql`, `)}) as v(doc_id, data, bytes, user_id, n)
    where v.doc_id in (select id from live)
    order by v.n
    returning seq, doc_id`);
  return seqsOf(result, rows);
}

/**
 * Each row's seq, or null when its document was gone. nextval() runs in insertion order, so the
 * ascending seqs are the inserted rows in order; a document's rows are all in or all out (one lock).
 */
function seqsOf(result: unknown, rows: readonly LogRow[]): Array<number | null> {
  const returned = rowsOf<{ seq: number | string; doc_id: string }>(result);
  const seqs = returned.map((r) => Number(r.seq)).sort((a, b) => a - b);
  const live = new Set(returned.map((r) => String(r.doc_id).toLowerCase()));
  const expected = rows.filter((row) => live.has(row.docId.toLowerCase())).length;
  if (seqs.length !== expected) throw new StoreError('append-failed', `inserted ${seqs.length} of ${expected} rows`);
  let next = 0;
  return rows.map((row) => (live.has(row.docId.toLowerCase()) ? seqs[next++]! : null));
}
