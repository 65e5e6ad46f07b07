/**
 * The log's plain INSERT on PGlite as named prepared statements, one per batch size up to
 * PREPARED_MAX rows, parsed and planned once and then only bound and executed. PGlite's own `query`
 * and `exec` parse (and `query` describes) the text on every call; for one row at the rate of 10
 * clients (an insert every 20 ms, caches cold) that measured 1.2-1.4 ms of this process's CPU, the
 * bound statement 0.8-0.9 ms (warm, back to back: 0.25-0.45 ms against 0.16-0.20 ms; PGlite 0.5.16,
 * issue 11). PGlite has no API for a named statement, so the extended-protocol messages are written
 * here (PostgreSQL documentation, "Message Formats" in "Frontend/Backend Protocol") and run through
 * `execProtocolRaw` under the same two locks PGlite's `exec` takes, so a statement never lands inside
 * another caller's transaction, followed by the same `syncToFs` `exec` does after a statement.
 */

/** Most rows bound to one prepared statement; larger batches go as literals (insert-batch.ts). */
export const PREPARED_MAX = 16;

/** What this file needs of PGlite's client (0.5.16); `_runExclusive*` are its internal locks. */
export interface PgliteWireClient {
  execProtocolRaw(message: Uint8Array, options?: { syncToFs?: boolean }): Promise<Uint8Array>;
  syncToFs(): Promise<void>;
  _runExclusiveTransaction<T>(fn: () => Promise<T>): Promise<T>;
  _runExclusiveQuery<T>(fn: () => Promise<T>): Promise<T>;
}

export function isPgliteWireClient(client: unknown): client is PgliteWireClient {
  const c = client as Partial<Record<keyof PgliteWireClient, unknown>> | null;
  return (
    c !== null &&
    typeof c.execProtocolRaw === 'function' &&
    typeof c.syncToFs === 'function' &&
    typeof c._runExclusiveTransaction === 'function' &&
    typeof c._runExclusiveQuery === 'function'
  );
}

export interface PreparedRow {
  docId: string;
  data: Uint8Array;
  userId: string | null;
}

/** An error the database answered with (its SQLSTATE as `code`, as PGlite's own errors carry it). */
export class WireError extends Error {
  constructor(
    message: string,
    readonly code: string,
  ) {
    super(message);
  }
}

const utf8 = new TextEncoder();
const EMPTY = new Uint8Array(0);
const SYNC = frame(0x53, [EMPTY]); // 'S'
const EXECUTE = frame(0x45, [cstring(''), int32(0)]); // 'E': unnamed portal, all rows

/** The INSERT for `n` rows: ($1,$2,$3,$4), ($5,…) … returning seq, doc_id. */
function insertText(n: number): string {
  const values: string[] = [];
  for (let i = 0; i < n; i++) {
    const p = i * 4;
    values.push(`($${p + 1}::uuid,$${p + 2}::bytea,$${p + 3}::int,$${p + 4}::uuid)`);
  }
  return `insert into updates (doc_id, data, bytes, user_id) values ${values.join(',')} returning seq, doc_id`;
}

/** Statement names already parsed, per client (a reopened database is a new client). */
const parsed = new WeakMap<PgliteWireClient, Set<number>>();

/**
 * Inserts up to PREPARED_MAX rows with the prepared plain INSERT and returns the rows' (seq, doc_id)
 * in insertion order. A database error is thrown as WireError (a gone document: 23503, nothing inserted).
 */
export async function insertPrepared(client: PgliteWireClient, rows: readonly PreparedRow[]): Promise<Array<{ seq: string; doc_id: string }>> {
  const n = rows.length;
  if (n < 1 || n > PREPARED_MAX) throw new RangeError(`insertPrepared takes 1 to ${PREPARED_MAX} rows, not ${n}`);
  let names = parsed.get(client);
  if (names === undefined) parsed.set(client, (names = new Set()));
  const name = `gloss_append_${n}`;
  const bind = bindMessage(name, rows);
  return client._runExclusiveTransaction(() =>
    client._runExclusiveQuery(async () => {
      const first = !names.has(n);
      const parse = first ? [frame(0x50, [cstring(name), cstring(insertText(n)), int16(0)])] : []; // 'P'
      const reply = await client.execProtocolRaw(concat([...parse, bind, EXECUTE, SYNC]), { syncToFs: false });
      const { rows: out, error } = readReply(reply);
      // Parsed once the server took the Parse: an error in Bind or Execute (a gone document) leaves the statement.
      if (first && !(error !== null && error.parseFailed)) names.add(n);
      await client.syncToFs();
      if (error !== null) throw new WireError(error.message, error.code);
      return out;
    }),
  );
}

function bindMessage(name: string, rows: readonly PreparedRow[]): Uint8Array {
  const parts: Uint8Array[] = [cstring(''), cstring(name)];
  // Parameter formats: per row doc_id text, data binary, bytes text, user_id text.
  parts.push(int16(rows.length * 4));
  const formats = concat([int16(0), int16(1), int16(0), int16(0)]);
  for (let i = 0; i < rows.length; i++) parts.push(formats);
  parts.push(int16(rows.length * 4));
  for (const row of rows) {
    const id = utf8.encode(row.docId);
    const bytes = utf8.encode(String(row.data.byteLength));
    parts.push(int32(id.length), id, int32(row.data.byteLength), row.data, int32(bytes.length), bytes);
    if (row.userId === null) parts.push(int32(-1));
    else {
      const user = utf8.encode(row.userId);
      parts.push(int32(user.length), user);
    }
  }
  parts.push(int16(0)); // results in text
  return frame(0x42, parts); // 'B'
}

interface ReplyError {
  message: string;
  code: string;
  /** The ParseComplete never came: the statement was not made. */
  parseFailed: boolean;
}

/** The DataRows (two text columns) and the ErrorResponse, if any, of the backend's reply. */
function readReply(reply: Uint8Array): { rows: Array<{ seq: string; doc_id: string }>; error: ReplyError | null } {
  const view = new DataView(reply.buffer, reply.byteOffset, reply.byteLength);
  const rows: Array<{ seq: string; doc_id: string }> = [];
  let error: ReplyError | null = null;
  let parseComplete = false;
  const text = new TextDecoder();
  for (let at = 0; at + 5 <= reply.length; ) {
    const type = reply[at]!;
    const end = at + 1 + view.getInt32(at + 1);
    let pos = at + 5;
    if (type === 0x31) parseComplete = true; // '1'
    else if (type === 0x44) {
      // 'D': column count, then each column's length and bytes
      const columns: string[] = [];
      const count = view.getInt16(pos);
      pos += 2;
      for (let c = 0; c < count; c++) {
        const len = view.getInt32(pos);
        pos += 4;
        columns.push(len < 0 ? '' : text.decode(reply.subarray(pos, pos + len)));
        pos += Math.max(0, len);
      }
      rows.push({ seq: columns[0]!, doc_id: columns[1]! });
    } else if (type === 0x45) {
      // 'E': fields, each a type byte and a C string, ended by a zero byte
      const fields = new Map<string, string>();
      while (pos < end && reply[pos] !== 0) {
        const field = String.fromCharCode(reply[pos]!);
        const stop = reply.indexOf(0, pos + 1);
        fields.set(field, text.decode(reply.subarray(pos + 1, stop)));
        pos = stop + 1;
      }
      error ??= { message: fields.get('M') ?? 'database error', code: fields.get('C') ?? '', parseFailed: !parseComplete };
    }
    at = end;
  }
  return { rows, error };
}

function frame(type: number, parts: readonly Uint8Array[]): Uint8Array {
  const length = parts.reduce((sum, p) => sum + p.length, 4);
  const out = new Uint8Array(1 + length);
  out[0] = type;
  new DataView(out.buffer).setInt32(1, length);
  let at = 5;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

function concat(parts: readonly Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((sum, p) => sum + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

function cstring(s: string): Uint8Array {
  const bytes = utf8.encode(s);
  const out = new Uint8Array(bytes.length + 1);
  out.set(bytes);
  return out;
}

function int16(n: number): Uint8Array {
  const out = new Uint8Array(2);
  new DataView(out.buffer).setInt16(0, n);
  return out;
}

function int32(n: number): Uint8Array {
  const out = new Uint8Array(4);
  new DataView(out.buffer).setInt32(0, n);
  return out;
}
