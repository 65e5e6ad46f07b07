import { describe, expect, it } from 'vitest';
import { addressKey, clientAddress } from './client-address.js';

describe('client address for rate limits', () => {
  it('ignores X-Forwarded-For unless TRUST_PROXY says how many proxies wrote it', () => {
    expect(clientAddress('10.0.0.5', '203.0.113.9', 0)).toBe('10.0.0.5');
    expect(clientAddress('10.0.0.5', '203.0.113.9', 1)).toBe('203.0.113.9');
    // A client-sent entry on the left cannot displace what the proxy appended (MDN, X-Forwarded-For: "rightmost").
    expect(clientAddress('10.0.0.5', '198.51.100.1, 203.0.113.9', 1)).toBe('203.0.113.9');
    expect(clientAddress('10.0.0.5', '198.51.100.1, 203.0.113.9, 10.0.0.4', 2)).toBe('203.0.113.9');
    // Missing or junk header: the socket's address.
    expect(clientAddress('10.0.0.5', undefined, 1)).toBe('10.0.0.5');
    expect(clientAddress('10.0.0.5', 'not-an-address', 1)).toBe('10.0.0.5');
    expect(clientAddress(undefined, undefined, 0)).toBe('unknown');
  });

  it('groups IPv6 by /64 and reads IPv4-mapped addresses as IPv4 (RFC 4291 §2.2, §2.5.5.2)', () => {
    expect(addressKey('::ffff:192.0.2.7')).toBe('192.0.2.7');
    expect(addressKey('2001:db8:1:2::1')).toBe('2001:db8:1:2::/64');
    expect(addressKey('2001:0db8:0001:0002:ffff:0:0:9')).toBe('2001:db8:1:2::/64');
    expect(addressKey('2001:db8::1')).toBe('2001:db8:0:0::/64');
    expect(addressKey('fe80::1%eth0')).toBe('fe80:0:0:0::/64');
    expect(addressKey('::1')).toBe('0:0:0:0::/64');
    expect(addressKey('64:ff9b::192.0.2.33')).toBe('64:ff9b:0:0::/64');
    expect(addressKey('192.0.2.7')).toBe('192.0.2.7');
  });
});
