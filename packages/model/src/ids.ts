/**
 * Stable random ids for segments, codes, memos, cases. 16 base-36 characters from the platform's
 * CSPRNG (`crypto.getRandomValues` exists in browsers and Node >= 19), about 82 bits: collisions
 * between offline clients are not a practical concern.
 */
const ALPHABET = '0123456789abcdefghijklmnopqrstuvwxyz';

export function newId(prefix = ''): string {
  const bytes = new Uint8Array(16);
  globalThis.crypto.getRandomValues(bytes);
  let out = prefix;
  for (const b of bytes) out += ALPHABET[b % 36];
  return out;
}

/** Milliseconds since the epoch; injectable so tests and replays are deterministic. */
export type Clock = () => number;
export const systemClock: Clock = () => Date.now();
