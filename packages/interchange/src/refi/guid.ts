/**
 * GUIDs for REFI-QDA (8-4-4-4-12 hex, spec §3). Gloss ids are not GUIDs, so each is turned into one
 * derived from the study and the id (SHA-1, shaped as an RFC 4122 name-based version-5 UUID): the
 * same study exported twice gives the same GUIDs, and different studies never share one.
 */
import { createHash } from 'node:crypto';

export function guidFor(scope: string, kind: string, id: string): string {
  const h = createHash('sha1').update(`${scope}\u0000${kind}\u0000${id}`).digest();
  h[6] = (h[6]! & 0x0f) | 0x50;
  h[8] = (h[8]! & 0x3f) | 0x80;
  const x = h.subarray(0, 16).toString('hex');
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20, 32)}`;
}

const GUID = /^\{?([0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12})\}?$/;

/** The canonical (lower-case, no braces) form, or null when `s` is not a GUID. */
export function normaliseGuid(s: unknown): string | null {
  if (typeof s !== 'string') return null;
  const m = GUID.exec(s.trim());
  return m ? m[1]!.toLowerCase() : null;
}
