/** Origins compared as RFC 6454 serialisations (scheme, host, port). */
import { describe, expect, it } from 'vitest';
import { isAllowedOrigin } from './origin.js';

describe('Origin check', () => {
  const req = (origin: string | null, host = 'localhost:8080', referer: string | null = null) => ({ origin, host, referer });

  it('accepts the request’s own host and the configured public URL', () => {
    expect(isAllowedOrigin(req('http://localhost:8080'), undefined)).toBe(true);
    expect(isAllowedOrigin(req('https://gloss.example.org', 'internal:9000'), 'https://gloss.example.org')).toBe(true);
  });

  it('refuses other hosts, other ports, opaque "null" origins, junk, and no Origin/Referer at all', () => {
    expect(isAllowedOrigin(req('http://evil.example'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('http://localhost:9999'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('null'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('not a url'), undefined)).toBe(false);
    expect(isAllowedOrigin(req(null), undefined)).toBe(false);
    expect(isAllowedOrigin(req('https://gloss.example.org.evil.example', 'x'), 'https://gloss.example.org')).toBe(false);
  });

  it('falls back to the Referer’s origin when Origin is absent', () => {
    expect(isAllowedOrigin(req(null, 'localhost:8080', 'http://localhost:8080/studies/1'), undefined)).toBe(true);
    expect(isAllowedOrigin(req(null, 'localhost:8080', 'http://evil.example/localhost:8080'), undefined)).toBe(false);
  });
});
