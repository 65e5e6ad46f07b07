/**
 * Server-side presence for one room, kept as the raw JSON each client sent (no re-serialising).
 * Follows y-protocols' acceptance rule: a newer clock wins; an equal clock wins only to remove a state.
 * Which connection may speak for which client id is decided by the caller (see connection.ts).
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { CloseCode, SyncError } from './errors.js';

export interface AwarenessEntry {
  clientId: number;
  clock: number;
  /** JSON text as sent; 'null' means the client left. */
  state: string;
}

interface Held {
  clock: number;
  state: string;
  seenAt: number;
}

/** Decodes and validates an awareness update (every state must be JSON, as clients JSON.parse it). */
export function decodeAwarenessUpdate(update: Uint8Array): AwarenessEntry[] {
  try {
    const decoder = decoding.createDecoder(update);
    const count = decoding.readVarUint(decoder);
    const entries: AwarenessEntry[] = [];
    for (let i = 0; i < count; i++) {
      const clientId = decoding.readVarUint(decoder);
      const clock = decoding.readVarUint(decoder);
      const state = decoding.readVarString(decoder);
      JSON.parse(state);
      entries.push({ clientId, clock, state });
    }
    return entries;
  } catch (cause) {
    throw new SyncError('invalid-awareness', 'malformed awareness update', CloseCode.invalidPayload, { cause });
  }
}

export function encodeAwarenessUpdate(entries: readonly AwarenessEntry[]): Uint8Array {
  const encoder = encoding.createEncoder();
  encoding.writeVarUint(encoder, entries.length);
  for (const e of entries) {
    encoding.writeVarUint(encoder, e.clientId);
    encoding.writeVarUint(encoder, e.clock);
    encoding.writeVarString(encoder, e.state);
  }
  return encoding.toUint8Array(encoder);
}

export class AwarenessTable {
  private readonly states = new Map<number, Held>();

  /** Stores the entries that are news; returns them (what should be forwarded). */
  apply(entries: readonly AwarenessEntry[], now = Date.now()): AwarenessEntry[] {
    const accepted: AwarenessEntry[] = [];
    for (const e of entries) {
      const held = this.states.get(e.clientId);
      const removing = e.state === 'null';
      const newer = held === undefined ? !removing : e.clock > held.clock || (e.clock === held.clock && removing);
      if (!newer) continue;
      if (removing) this.states.delete(e.clientId);
      else this.states.set(e.clientId, { clock: e.clock, state: e.state, seenAt: now });
      accepted.push(e);
    }
    return accepted;
  }

  /** The removal entry for a client (clock + 1, state null), applied here too. */
  remove(clientId: number): AwarenessEntry | null {
    const held = this.states.get(clientId);
    if (held === undefined) return null;
    this.states.delete(clientId);
    return { clientId, clock: held.clock + 1, state: 'null' };
  }

  /** Current states, dropping those not renewed within `maxAgeMs` (clients renew every 15 s). */
  snapshot(now = Date.now(), maxAgeMs = 30_000): AwarenessEntry[] {
    const out: AwarenessEntry[] = [];
    for (const [clientId, held] of this.states) {
      if (now - held.seenAt > maxAgeMs) this.states.delete(clientId);
      else out.push({ clientId, clock: held.clock, state: held.state });
    }
    return out;
  }

  get size(): number {
    return this.states.size;
  }
}
