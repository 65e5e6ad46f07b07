/**
 * Origins compared as RFC 6454 serialisations (scheme, host, port), exactly, as hono's csrf middleware
 * compares Origin with the request URL's origin (hono 4.13 src/middleware/csrf).
 */
import { describe, expect, it } from 'vitest';
import { isAllowedOrigin } from './origin.js';

describe('Origin check', () => {
  const req = (origin: string | null, selfOrigin = 'http://localhost:8080', referer: string | null = null) => ({ origin, selfOrigin, referer });

  it('accepts the request’s own origin and, when set, the configured public URL only', () => {
    expect(isAllowedOrigin(req('http://localhost:8080'), undefined)).toBe(true);
    expect(isAllowedOrigin(req('http://LOCALHOST:8080'), undefined)).toBe(true); // hosts are case-insensitive (RFC 3986 §3.2.2)
    expect(isAllowedOrigin(req('https://gloss.example.org', 'http://internal:9000'), 'https://gloss.example.org')).toBe(true);
    expect(isAllowedOrigin(req('http://internal:9000', 'http://internal:9000'), 'https://gloss.example.org')).toBe(false);
  });

  it('refuses another scheme or port on the same host (the old check compared host only)', () => {
    expect(isAllowedOrigin(req('https://localhost:8080'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('http://gloss.example.org', 'http://gloss.example.org'), 'https://gloss.example.org')).toBe(false);
    expect(isAllowedOrigin(req('http://localhost:9999'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('http://localhost', 'http://localhost:80'), undefined)).toBe(true); // default port elided (RFC 6454 §6.1)
  });

  it('refuses other hosts, opaque "null" origins, junk, and no Origin/Referer at all', () => {
    expect(isAllowedOrigin(req('http://evil.example'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('null'), undefined)).toBe(false);
    expect(isAllowedOrigin(req('not a url'), undefined)).toBe(false);
    expect(isAllowedOrigin(req(null), undefined)).toBe(false);
    expect(isAllowedOrigin(req('https://gloss.example.org.evil.example', 'x'), 'https://gloss.example.org')).toBe(false);
    expect(isAllowedOrigin({ origin: 'http://localhost:8080', referer: null, selfOrigin: null }, undefined)).toBe(false);
  });

  it('falls back to the Referer’s origin when Origin is absent', () => {
    expect(isAllowedOrigin(req(null, 'http://localhost:8080', 'http://localhost:8080/studies/1'), undefined)).toBe(true);
    expect(isAllowedOrigin(req(null, 'http://localhost:8080', 'http://evil.example/localhost:8080'), undefined)).toBe(false);
  });
});
