import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { generateSessionToken, looksLikeToken, sessionIdFromToken } from './tokens.js';

describe('session tokens', () => {
  it('hashes with SHA-256: FIPS 180-2 Appendix B.1 value for "abc"', () => {
    expect(sessionIdFromToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('agrees with node:crypto SHA-256 on random tokens (reference implementation)', () => {
    for (let i = 0; i < 20; i++) {
      const token = generateSessionToken();
      expect(sessionIdFromToken(token)).toBe(createHash('sha256').update(token).digest('hex'));
    }
  });

  it('makes 20-byte tokens as lower-case unpadded base32 (RFC 4648 §6 alphabet): 32 characters, all distinct', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) {
      const token = generateSessionToken();
      expect(token).toMatch(/^[a-z2-7]{32}$/);
      expect(looksLikeToken(token)).toBe(true);
      seen.add(token);
    }
    expect(seen.size).toBe(200);
    expect(looksLikeToken('ABC')).toBe(false);
    expect(looksLikeToken('a'.repeat(31) + '1')).toBe(false);
  });
});
