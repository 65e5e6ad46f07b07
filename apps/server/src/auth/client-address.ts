/**
 * The client's address for rate limits. By default the socket's peer; with TRUST_PROXY=n (n proxies
 * in front, each appending the address it saw to X-Forwarded-For) the entry n places from the right,
 * which the nearest proxy wrote and the client cannot forge. Off by default: without a proxy anyone can
 * send the header. IPv6 addresses are grouped by their /64 prefix, since one host usually holds a whole
 * /64 (RFC 6177; common practice in rate limiters), and IPv4-mapped IPv6 addresses count as IPv4.
 */
import { isIP } from 'node:net';

export function clientAddress(socketAddress: string | undefined, forwardedFor: string | undefined, trustedHops: number): string {
  let address = socketAddress;
  if (trustedHops > 0 && forwardedFor) {
    const hops = forwardedFor.split(',').map((s) => s.trim()).filter(Boolean);
    const claimed = hops[hops.length - trustedHops];
    if (claimed && isIP(stripZone(claimed))) address = claimed;
  }
  return address ? addressKey(address) : 'unknown';
}

/** IPv4 as is; IPv4-mapped IPv6 as IPv4; other IPv6 as its /64 prefix (`2001:db8:1:2::/64`). */
export function addressKey(address: string): string {
  const ip = stripZone(address);
  const mapped = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(ip);
  if (mapped) return mapped[1]!;
  if (isIP(ip) !== 6) return ip;
  const groups = expandIPv6(ip);
  return groups ? `${groups.slice(0, 4).map((g) => g.replace(/^0+(?=.)/, '')).join(':')}::/64` : ip;
}

function stripZone(ip: string): string {
  const pct = ip.indexOf('%');
  return pct >= 0 ? ip.slice(0, pct) : ip;
}

/** Eight lower-case groups of a valid IPv6 address (an embedded IPv4 tail becomes two groups). */
function expandIPv6(ip: string): string[] | null {
  let text = ip.toLowerCase();
  const v4 = /(\d{1,3})\.(\d{1,3})\.(\d{1,3})\.(\d{1,3})$/.exec(text);
  if (v4) {
    const [a, b, c, d] = v4.slice(1).map(Number) as [number, number, number, number];
    text = text.slice(0, v4.index) + ((a << 8) | b).toString(16) + ':' + ((c << 8) | d).toString(16);
  }
  const [head, tail] = text.split('::') as [string, string | undefined];
  const left = head ? head.split(':') : [];
  const right = tail ? tail.split(':') : [];
  const missing = 8 - left.length - right.length;
  if (tail === undefined ? missing !== 0 : missing < 0) return null;
  return [...left, ...Array<string>(Math.max(0, missing)).fill('0'), ...right];
}
