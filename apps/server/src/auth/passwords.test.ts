/** argon2id with the OWASP Password Storage Cheat Sheet parameters; the PHC string format records them. */
import { describe, expect, it } from 'vitest';
import { hashPassword, verifyPassword } from './passwords.js';

describe('passwords', () => {
  it('hashes with argon2id v=19 (0x13, RFC 9106), m=19456, t=2, p=1 and verifies', async () => {
    const h = await hashPassword('correct horse battery staple');
    expect(h).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
    expect(await verifyPassword(h, 'correct horse battery staple')).toBe(true);
    expect(await verifyPassword(h, 'Correct horse battery staple')).toBe(false);
  });

  it('treats a malformed stored hash as a failed check, not a crash', async () => {
    expect(await verifyPassword('not-a-hash', 'x')).toBe(false);
    expect(await verifyPassword('!', 'x')).toBe(false); // the placeholder of imported accounts
  });
});
