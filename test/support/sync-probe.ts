/**
 * A raw sync connection for probing a server message by message (y-protocols 1.0.7 framing:
 * varUint message type, then sync.js / awareness.js payloads). Used to time nothing: tests assert
 * what comes back and in which order.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { WebSocket } from 'ws';
import * as syncProtocol from 'y-protocols/sync';
import * as Y from 'yjs';

export const MESSAGE_SYNC = 0;
export const MESSAGE_AWARENESS = 1;
export const MESSAGE_AUTH = 2;
export const MESSAGE_QUERY_AWARENESS = 3;

export interface Probe {
  ws: WebSocket;
  /** Every binary message received so far. */
  received: Uint8Array[];
  /** The close code once closed (pending until then). */
  closed: Promise<{ code: number; reason: string }>;
  send(bytes: Uint8Array): void;
  /** Resolves with the first received message (from index `from` on) that `match` accepts. */
  next(match: (m: Uint8Array) => boolean, from?: number, timeoutMs?: number): Promise<Uint8Array>;
  close(): void;
}

/** Opens `/sync/<room>` with the person's cookie; rejects if the upgrade is refused. */
export async function openProbe(baseUrl: string, room: string, cookie: string): Promise<Probe> {
  const ws = new WebSocket(`${baseUrl.replace(/^http/, 'ws')}/sync/${room}`, { headers: { cookie, origin: baseUrl } });
  const received: Uint8Array[] = [];
  const waiters = new Set<() => void>();
  ws.on('message', (data) => {
    received.push(new Uint8Array(data as Buffer));
    for (const w of [...waiters]) w();
  });
  const closed = new Promise<{ code: number; reason: string }>((resolve) =>
    ws.on('close', (code, reason) => {
      resolve({ code, reason: reason.toString() });
      for (const w of [...waiters]) w();
    }),
  );
  ws.on('error', () => {});
  await new Promise<void>((resolve, reject) => {
    ws.once('open', () => resolve());
    ws.once('unexpected-response', (_req, res) => reject(new Error(`upgrade refused: ${res.statusCode}`)));
    ws.once('error', reject);
  });
  return {
    ws,
    received,
    closed,
    send: (bytes) => ws.send(bytes),
    next(match, from = 0, timeoutMs = 20_000) {
      return new Promise((resolve, reject) => {
        const check = () => {
          const hit = received.slice(from).find(match);
          if (hit) return done(() => resolve(hit));
          if (ws.readyState === WebSocket.CLOSED) return done(() => reject(new Error('connection closed before the expected message')));
        };
        const timer = setTimeout(() => done(() => reject(new Error(`no such message within ${timeoutMs} ms`))), timeoutMs);
        const done = (fn: () => void) => {
          clearTimeout(timer);
          waiters.delete(check);
          fn();
        };
        waiters.add(check);
        check();
      });
    },
    close: () => ws.close(),
  };
}

export function frame(write: (e: encoding.Encoder) => void): Uint8Array {
  const e = encoding.createEncoder();
  write(e);
  return encoding.toUint8Array(e);
}

/** Sync step 1 with the state vector of `doc` (an empty one by default). */
export function syncStep1(doc = new Y.Doc()): Uint8Array {
  return frame((e) => {
    encoding.writeVarUint(e, MESSAGE_SYNC);
    syncProtocol.writeSyncStep1(e, doc);
  });
}

/** The message type and, for sync messages, the sync step (0 step 1, 1 step 2, 2 update). */
export function kindOf(m: Uint8Array): { type: number; step?: number } {
  const d = decoding.createDecoder(m);
  const type = decoding.readVarUint(d);
  return type === MESSAGE_SYNC ? { type, step: decoding.readVarUint(d) } : { type };
}

export const isSyncStep2 = (m: Uint8Array) => {
  const k = kindOf(m);
  return k.type === MESSAGE_SYNC && k.step === 1;
};
