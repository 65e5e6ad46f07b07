/**
 * The opening bundle: the states of every document a page opens (a text, its layers, the codebook,
 * the memos) in one binary message, so the page renders from one response before any socket is open
 * (`GET /api/texts/:id/opening`). The page applies each state and its sockets then exchange only what
 * changed since (the sync protocol's state-vector step).
 *
 * Version 1 (asked without `sv`), lib0 encoding: varUint version, varString ticket ('' for none), varUint
 * count, then per document varString room, varString kind, varUint8Array state (the whole document).
 *
 * Version 2 (asked with `sv`, the state vectors of the copies this device keeps, `encodeStateVectors`):
 * the same, and per document after the state a varUint (1 when the state is only what the document
 * gained since the device's state vector, 0 when it is the whole document) and varUint8Array the state
 * vector of the server's document as sent (what the device's copy holds once it applied the state).
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { InvalidArgumentError, ModelError } from './errors.js';

export const OPENING_VERSION = 1;
export const OPENING_VERSION_DIFF = 2;

export interface OpeningDoc {
  room: string;
  kind: string;
  state: Uint8Array;
  /** Version 2: `state` holds only what the document gained since the state vector the device sent. */
  diff?: boolean;
  /** Version 2: the state vector of the server's document as sent. */
  stateVector?: Uint8Array;
}

export interface Opening {
  /** The sync ticket for this page's sockets ('' when the server gave none). */
  ticket: string;
  docs: OpeningDoc[];
}

/** Version 1 unless a document carries a state vector (the answer to a request with `sv`): then version 2. */
export function encodeOpening(opening: Opening): Uint8Array {
  const v2 = opening.docs.some((d) => d.stateVector !== undefined);
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, v2 ? OPENING_VERSION_DIFF : OPENING_VERSION);
  encoding.writeVarString(e, opening.ticket);
  encoding.writeVarUint(e, opening.docs.length);
  for (const d of opening.docs) {
    encoding.writeVarString(e, d.room);
    encoding.writeVarString(e, d.kind);
    encoding.writeVarUint8Array(e, d.state);
    if (v2) {
      encoding.writeVarUint(e, d.diff ? 1 : 0);
      encoding.writeVarUint8Array(e, d.stateVector ?? new Uint8Array([0]));
    }
  }
  return encoding.toUint8Array(e);
}

/** Throws a ModelError on a message of another version or a cut-off one. */
export function decodeOpening(bytes: Uint8Array): Opening {
  try {
    const d = decoding.createDecoder(bytes);
    const version = decoding.readVarUint(d);
    if (version !== OPENING_VERSION && version !== OPENING_VERSION_DIFF) {
      throw new InvalidArgumentError(`Opening bundle of version ${version}; this app reads versions ${OPENING_VERSION} and ${OPENING_VERSION_DIFF}.`);
    }
    const ticket = decoding.readVarString(d);
    const n = decoding.readVarUint(d);
    const docs: OpeningDoc[] = [];
    for (let i = 0; i < n; i++) {
      const doc: OpeningDoc = { room: decoding.readVarString(d), kind: decoding.readVarString(d), state: decoding.readVarUint8Array(d) };
      if (version === OPENING_VERSION_DIFF) {
        doc.diff = decoding.readVarUint(d) === 1;
        doc.stateVector = decoding.readVarUint8Array(d);
      }
      docs.push(doc);
    }
    if (decoding.hasContent(d)) throw new InvalidArgumentError('Opening bundle has bytes after its last document.');
    return { ticket, docs };
  } catch (err) {
    if (err instanceof ModelError) throw err;
    throw new InvalidArgumentError(`Opening bundle could not be read: ${(err as Error).message}`);
  }
}

/**
 * The state vectors of the copies a device keeps, by room, as the opening request's `sv` parameter
 * carries them (base64url): varUint count, then per room varString room, varUint8Array state vector.
 */
export function encodeStateVectors(vectors: ReadonlyMap<string, Uint8Array>): Uint8Array {
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, vectors.size);
  for (const [room, sv] of vectors) {
    encoding.writeVarString(e, room);
    encoding.writeVarUint8Array(e, sv);
  }
  return encoding.toUint8Array(e);
}

/** Throws an InvalidArgumentError on a cut-off message or trailing bytes. */
export function decodeStateVectors(bytes: Uint8Array): Map<string, Uint8Array> {
  try {
    const d = decoding.createDecoder(bytes);
    const n = decoding.readVarUint(d);
    const out = new Map<string, Uint8Array>();
    for (let i = 0; i < n; i++) out.set(decoding.readVarString(d), decoding.readVarUint8Array(d));
    if (decoding.hasContent(d)) throw new InvalidArgumentError('State vectors have bytes after the last room.');
    return out;
  } catch (err) {
    if (err instanceof ModelError) throw err;
    throw new InvalidArgumentError(`State vectors could not be read: ${(err as Error).message}`);
  }
}
