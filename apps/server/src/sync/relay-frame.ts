/** What one node tells the others about a room: a committed update or an awareness update. */
export type RelayFrame = { kind: 'update'; data: Uint8Array } | { kind: 'awareness'; data: Uint8Array };

const KIND_UPDATE = 0;
const KIND_AWARENESS = 1;

export function encodeRelayFrame(frame: RelayFrame): Uint8Array {
  const out = new Uint8Array(frame.data.length + 1);
  out[0] = frame.kind === 'update' ? KIND_UPDATE : KIND_AWARENESS;
  out.set(frame.data, 1);
  return out;
}

/** null for frames this version does not understand (a newer node): they are ignored, not fatal. */
export function decodeRelayFrame(payload: Uint8Array): RelayFrame | null {
  const data = payload.subarray(1);
  if (payload[0] === KIND_UPDATE) return { kind: 'update', data };
  if (payload[0] === KIND_AWARENESS) return { kind: 'awareness', data };
  return null;
}
