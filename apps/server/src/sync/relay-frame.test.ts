/** Relay frames round-trip; unknown kinds are ignored and truncated frames throw (caught by the room). */
import { describe, expect, it } from 'vitest';
import { decodeRelayFrame, encodeRelayFrame } from './relay-frame.js';

describe('relay frames', () => {
  it('round-trip updates with their seq and awareness payloads', () => {
    const data = new Uint8Array([1, 2, 3, 0, 255]);
    expect(decodeRelayFrame(encodeRelayFrame({ kind: 'update', seq: 123_456_789, data }))).toEqual({ kind: 'update', seq: 123_456_789, data });
    expect(decodeRelayFrame(encodeRelayFrame({ kind: 'awareness', data }))).toEqual({ kind: 'awareness', data });
  });

  it('ignores unknown kinds and rejects truncated frames', () => {
    expect(decodeRelayFrame(new Uint8Array([9, 1, 2]))).toBeNull();
    expect(() => decodeRelayFrame(new Uint8Array([0, 0x80]))).toThrow();
    expect(decodeRelayFrame(new Uint8Array([]))).toBeNull();
  });
});
