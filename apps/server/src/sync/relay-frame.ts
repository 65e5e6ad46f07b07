/**
 * What one node tells the others about a room: a committed update (with its log seq, so catch-up
 * can skip what already arrived) or an awareness update.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';

export type RelayFrame = { kind: 'update'; seq: number; data: Uint8Array } | { kind: 'awareness'; data: Uint8Array };

const KIND_UPDATE = 0;
const KIND_AWARENESS = 1;

export function encodeRelayFrame(frame: RelayFrame): Uint8Array {
  const encoder = encoding.createEncoder();
  encoding.writeUint8(encoder, frame.kind === 'update' ? KIND_UPDATE : KIND_AWARENESS);
  if (frame.kind === 'update') encoding.writeVarUint(encoder, frame.seq);
  encoding.writeUint8Array(encoder, frame.data);
  return encoding.toUint8Array(encoder);
}

/** null for frames this version does not understand (a newer node): they are ignored, not fatal. Throws on truncation. */
export function decodeRelayFrame(payload: Uint8Array): RelayFrame | null {
  const decoder = decoding.createDecoder(payload);
  const kind = decoding.readUint8(decoder);
  if (kind === KIND_AWARENESS) return { kind: 'awareness', data: payload.subarray(1) };
  if (kind !== KIND_UPDATE) return null;
  const seq = decoding.readVarUint(decoder);
  return { kind: 'update', seq, data: payload.subarray(decoder.pos) };
}
