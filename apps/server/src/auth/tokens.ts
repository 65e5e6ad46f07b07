/**
 * Session tokens as the Lucia project's session guide describes: 20 random bytes (160 bits) in
 * lower-case base32 go to the client; the database keeps only the hex SHA-256 of the token, so a
 * leaked sessions table cannot be replayed.
 */
import { sha256 } from '@oslojs/crypto/sha2';
import { encodeBase32LowerCaseNoPadding, encodeHexLowerCase } from '@oslojs/encoding';
import { randomBytes } from 'node:crypto';

export function generateSessionToken(): string {
  return encodeBase32LowerCaseNoPadding(randomBytes(20));
}

export function sessionIdFromToken(token: string): string {
  return encodeHexLowerCase(sha256(new TextEncoder().encode(token)));
}

/** 20 bytes → 32 base32 characters; anything else is not one of ours and is not looked up. */
export function looksLikeToken(token: string): boolean {
  return /^[a-z2-7]{32}$/.test(token);
}
