/**
 * Reading what a stock y-websocket client receives, frame by frame, for the wire-level round tests.
 * A ws subclass records every message of every socket it opens; `decodeFrame` turns one frame into
 * words using y-protocols' own message layout (sync step 1/2 and update, awareness, auth, query
 * awareness) and Yjs' `decodeUpdate`, so a scan sees map keys, strings and binary content, not only
 * raw bytes.
 */
import * as decoding from 'lib0/decoding';
import { WebSocket } from 'ws';
import * as Y from 'yjs';

export interface Frame {
  /** The room the socket was opened for, as in its URL. */
  room: string;
  bytes: Uint8Array;
}

const toBytes = (data: unknown): Uint8Array => {
  if (data instanceof ArrayBuffer) return new Uint8Array(data);
  if (Array.isArray(data)) return new Uint8Array(Buffer.concat(data as Buffer[]));
  if (ArrayBuffer.isView(data)) return new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
  return new TextEncoder().encode(String(data));
};

/** A ws class for y-websocket's WebSocketPolyfill that sends the cookie and Origin and keeps every frame received. */
export function recordingWebSocket(headers: Record<string, string>, frames: Frame[]) {
  return class extends WebSocket {
    constructor(address: string | URL, protocols?: string | string[]) {
      super(address, protocols, { headers });
      const room = decodeURIComponent(new URL(String(address)).pathname.split('/').pop() ?? '');
      this.on('message', (data: unknown) => frames.push({ room, bytes: toBytes(data) }));
    }
  };
}

export interface Decoded {
  kind: 'sync-step1' | 'sync-step2' | 'sync-update' | 'awareness' | 'auth' | 'query-awareness' | 'unknown';
  /** Everything the frame carries, as text (strings, map keys, JSON states, binary as latin1). */
  text: string;
  /** Awareness frames: the states by client id (null: the client left). */
  states?: Array<{ clientId: number; state: Record<string, unknown> | null }>;
}

const show = (v: unknown): unknown => (v instanceof Uint8Array ? Buffer.from(v).toString('latin1') : v instanceof Y.AbstractType ? '<type>' : v);

function updateText(update: Uint8Array): string {
  const { structs } = Y.decodeUpdate(update);
  const parts: string[] = [];
  for (const s of structs) {
    if (!(s instanceof Y.Item)) continue;
    if (s.parentSub) parts.push(s.parentSub);
    if (typeof s.parent === 'string') parts.push(s.parent);
    parts.push(JSON.stringify(s.content.getContent().map(show)));
  }
  return parts.join('\n');
}

export function decodeFrame(bytes: Uint8Array): Decoded {
  const d = decoding.createDecoder(bytes);
  const type = decoding.readVarUint(d);
  if (type === 0) {
    const sub = decoding.readVarUint(d);
    const payload = decoding.readVarUint8Array(d);
    if (sub === 0) return { kind: 'sync-step1', text: '' }; // a state vector: clock numbers only
    return { kind: sub === 1 ? 'sync-step2' : 'sync-update', text: updateText(payload) };
  }
  if (type === 1) {
    const inner = decoding.createDecoder(decoding.readVarUint8Array(d));
    const n = decoding.readVarUint(inner);
    const states: NonNullable<Decoded['states']> = [];
    for (let i = 0; i < n; i++) {
      const clientId = decoding.readVarUint(inner);
      decoding.readVarUint(inner); // clock
      states.push({ clientId, state: JSON.parse(decoding.readVarString(inner)) as Record<string, unknown> | null });
    }
    return { kind: 'awareness', text: JSON.stringify(states), states };
  }
  if (type === 2) {
    decoding.readVarUint(d);
    return { kind: 'auth', text: decoding.readVarString(d) };
  }
  if (type === 3) return { kind: 'query-awareness', text: '' };
  return { kind: 'unknown', text: Buffer.from(bytes).toString('latin1') };
}

/** The markers found in a payload, by decoded text and by raw bytes (UTF-8). */
export function markersIn(payload: Uint8Array | string, markers: readonly string[]): string[] {
  const buf = typeof payload === 'string' ? Buffer.from(payload, 'utf8') : Buffer.from(payload);
  return markers.filter((m) => buf.includes(Buffer.from(m, 'utf8')));
}
