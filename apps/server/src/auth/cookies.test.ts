/** Cookie attributes per RFC 6265bis (HttpOnly, SameSite=Lax, Secure), as the Lucia session guide sets them. */
import { describe, expect, it } from 'vitest';
import { clearedSessionCookie, readSessionToken, sessionCookie } from './cookies.js';

describe('session cookie', () => {
  it('is HttpOnly, SameSite=Lax, Path=/, Secure only when asked', () => {
    const c = sessionCookie('tok', new Date('2030-01-02T03:04:05Z'), false);
    expect(c).toBe('gloss_session=tok; HttpOnly; SameSite=Lax; Path=/; Expires=Wed, 02 Jan 2030 03:04:05 GMT');
    expect(sessionCookie('tok', new Date(0), true)).toMatch(/; Secure$/);
    expect(clearedSessionCookie(false)).toContain('Max-Age=0');
  });

  it('reads the token among other cookies and tolerates junk', () => {
    expect(readSessionToken('a=1; gloss_session=abc; b=2')).toBe('abc');
    expect(readSessionToken('junk; ;;=; gloss_session=')).toBeNull();
    expect(readSessionToken(undefined)).toBeNull();
  });
});
