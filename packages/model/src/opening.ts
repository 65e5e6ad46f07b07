/**
 * The opening bundle: the states of every document a page opens (a text, its layers, the codebook,
 * the memos) in one binary message, so the page renders from one response before any socket is open
 * (`GET /api/texts/:id/opening`). Each state is a Yjs update of the whole document; the page applies it
 * and its sockets then exchange only what changed since (the sync protocol's state-vector step).
 *
 * Layout (lib0 encoding): varUint version, varString ticket ('' for none), varUint count, then per
 * document varString room, varString kind, varUint8Array state.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { InvalidArgumentError, ModelError } from './errors.js';

export const OPENING_VERSION = 1;

export interface OpeningDoc {
  room: string;
  kind: string;
  state: Uint8Array;
}

export interface Opening {
  /** The sync ticket for this page's sockets ('' when the server gave none). */
  ticket: string;
  docs: OpeningDoc[];
}

export function encodeOpening(opening: Opening): Uint8Array {
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, OPENING_VERSION);
  encoding.writeVarString(e, opening.ticket);
  encoding.writeVarUint(e, opening.docs.length);
  for (const d of opening.docs) {
    encoding.writeVarString(e, d.room);
    encoding.writeVarString(e, d.kind);
    encoding.writeVarUint8Array(e, d.state);
  }
  return encoding.toUint8Array(e);
}

/** Throws a ModelError on a message of another version or a cut-off one. */
export function decodeOpening(bytes: Uint8Array): Opening {
  try {
    const d = decoding.createDecoder(bytes);
    const version = decoding.readVarUint(d);
    if (version !== OPENING_VERSION) throw new InvalidArgumentError(`Opening bundle of version ${version}; this app reads version ${OPENING_VERSION}.`);
    const ticket = decoding.readVarString(d);
    const n = decoding.readVarUint(d);
    const docs: OpeningDoc[] = [];
    for (let i = 0; i < n; i++) docs.push({ room: decoding.readVarString(d), kind: decoding.readVarString(d), state: decoding.readVarUint8Array(d) });
    if (decoding.hasContent(d)) throw new InvalidArgumentError('Opening bundle has bytes after its last document.');
    return { ticket, docs };
  } catch (err) {
    if (err instanceof ModelError) throw err;
    throw new InvalidArgumentError(`Opening bundle could not be read: ${(err as Error).message}`);
  }
}
