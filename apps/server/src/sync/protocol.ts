/**
 * The y-websocket wire format (y-protocols sync/awareness/auth, lib0 encoding).
 * Encoders build whole messages; `peekKind` reads only the leading varuints so a
 * read-only connection's writes can be refused before the payload is decoded.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { CloseCode, SyncError } from './errors.js';

export const MessageType = { sync: 0, awareness: 1, auth: 2, queryAwareness: 3 } as const;
export const SyncStep = { step1: 0, step2: 1, update: 2 } as const;

export type MessageKind =
  | { type: 'sync-step1' }
  | { type: 'sync-step2' }
  | { type: 'sync-update' }
  | { type: 'awareness' }
  | { type: 'query-awareness' }
  | { type: 'auth' };

/** The message's kind from its first one or two varuints, and a decoder positioned after them. */
export function peekKind(message: Uint8Array): { kind: MessageKind['type']; decoder: decoding.Decoder } {
  const decoder = decoding.createDecoder(message);
  const type = readVarUint(decoder);
  switch (type) {
    case MessageType.sync: {
      const step = readVarUint(decoder);
      if (step === SyncStep.step1) return { kind: 'sync-step1', decoder };
      if (step === SyncStep.step2) return { kind: 'sync-step2', decoder };
      if (step === SyncStep.update) return { kind: 'sync-update', decoder };
      throw new SyncError('unsupported-message', `unknown sync step ${step}`, CloseCode.unsupportedData);
    }
    case MessageType.awareness:
      return { kind: 'awareness', decoder };
    case MessageType.queryAwareness:
      return { kind: 'query-awareness', decoder };
    case MessageType.auth:
      return { kind: 'auth', decoder };
    default:
      throw new SyncError('unsupported-message', `unknown message type ${type}`, CloseCode.unsupportedData);
  }
}

/** Reads a length-prefixed byte array, turning lib0's range errors into a typed error. */
export function readPayload(decoder: decoding.Decoder): Uint8Array {
  try {
    return decoding.readVarUint8Array(decoder);
  } catch (cause) {
    throw new SyncError('malformed-message', 'truncated message', CloseCode.invalidPayload, { cause });
  }
}

function readVarUint(decoder: decoding.Decoder): number {
  try {
    return decoding.readVarUint(decoder);
  } catch (cause) {
    throw new SyncError('malformed-message', 'truncated message header', CloseCode.invalidPayload, { cause });
  }
}

export function encodeSyncStep1(stateVector: Uint8Array): Uint8Array {
  return encodeSync(SyncStep.step1, stateVector);
}

export function encodeSyncStep2(update: Uint8Array): Uint8Array {
  return encodeSync(SyncStep.step2, update);
}

export function encodeSyncUpdate(update: Uint8Array): Uint8Array {
  return encodeSync(SyncStep.update, update);
}

function encodeSync(step: number, payload: Uint8Array): Uint8Array {
  const encoder = encoding.createEncoder();
  encoding.writeVarUint(encoder, MessageType.sync);
  encoding.writeVarUint(encoder, step);
  encoding.writeVarUint8Array(encoder, payload);
  return encoding.toUint8Array(encoder);
}

export function encodeAwarenessMessage(awarenessUpdate: Uint8Array): Uint8Array {
  const encoder = encoding.createEncoder();
  encoding.writeVarUint(encoder, MessageType.awareness);
  encoding.writeVarUint8Array(encoder, awarenessUpdate);
  return encoding.toUint8Array(encoder);
}

/** y-protocols/auth "permission denied" (auth message, sub-type 0, reason string). */
export function encodePermissionDenied(reason: string): Uint8Array {
  const encoder = encoding.createEncoder();
  encoding.writeVarUint(encoder, MessageType.auth);
  encoding.writeVarUint(encoder, 0);
  encoding.writeVarString(encoder, reason);
  return encoding.toUint8Array(encoder);
}
