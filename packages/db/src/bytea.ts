/**
 * PostgreSQL `bytea` as a drizzle column. drizzle-orm has no built-in bytea; the two drivers disagree
 * on what they return (PGlite: Uint8Array, postgres.js: Buffer), so reads are normalised to a plain
 * Uint8Array view and callers never see a Buffer.
 */
import { customType } from 'drizzle-orm/pg-core';

export function toUint8Array(value: unknown): Uint8Array {
  if (value instanceof Uint8Array) {
    // Buffer is a Uint8Array subclass; re-wrap so equality checks and Yjs see the base class.
    return value.constructor === Uint8Array ? value : new Uint8Array(value.buffer, value.byteOffset, value.byteLength);
  }
  if (typeof value === 'string' && value.startsWith('\\x')) {
    // Text-format bytea (hex escape), as returned when a driver does not parse the type.
    return Uint8Array.from(Buffer.from(value.slice(2), 'hex'));
  }
  throw new TypeError(`bytea: unexpected value of type ${typeof value}`);
}

export const bytea = customType<{ data: Uint8Array; driverData: Uint8Array }>({
  dataType() {
    return 'bytea';
  },
  fromDriver(value: unknown) {
    return toUint8Array(value);
  },
  toDriver(value: Uint8Array) {
    // postgres.js serialises Buffer as bytea; PGlite accepts both.
    return Buffer.from(value.buffer, value.byteOffset, value.byteLength);
  },
});
