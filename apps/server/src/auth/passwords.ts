/**
 * Password hashing with argon2id at the OWASP Password Storage Cheat Sheet's first recommended
 * setting (m=19456 KiB, t=2, p=1).
 */
import { hash, verify, type Algorithm } from '@node-rs/argon2';

// Algorithm is a const enum, which isolatedModules cannot inline: 2 is Algorithm.Argon2id.
const ARGON2ID = 2 as Algorithm;
export const ARGON2_OPTIONS = { algorithm: ARGON2ID, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export const MIN_PASSWORD_LENGTH = 8;
export const MAX_PASSWORD_LENGTH = 256;

export function hashPassword(password: string): Promise<string> {
  return hash(password, ARGON2_OPTIONS);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    // A malformed stored hash (an imported account's placeholder) is a failed sign-in, not a crash, and
    // costs a full verification: a fast refusal would tell a caller that this email has an account.
    await spendVerifyTime(password);
    return false;
  }
}

let dummyHash: Promise<string> | undefined;
/** Makes the throwaway hash now, so the first unknown email costs no more than later ones. */
export function warmVerifyTime(): Promise<string> {
  return (dummyHash ??= hashPassword('gloss-timing-equaliser'));
}

/**
 * Verifies against a throwaway hash so that an unknown email costs as much as a known one with a
 * wrong password (one argon2id verification on every sign-in path: no account probing by timing).
 */
export async function spendVerifyTime(password: string): Promise<void> {
  await verify(await warmVerifyTime(), password).catch(() => false);
}
