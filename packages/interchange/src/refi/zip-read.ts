/**
 * Reading a .qdpx archive safely. Every entry name is checked before anything is unpacked: a name that
 * would reach outside the archive (`../`, an absolute path, a drive letter, a backslash) refuses the
 * whole file. Sizes are checked against the sizes the archive declares before inflating, and fflate
 * inflates each entry into a buffer of its declared size, so an entry that lies about its size cannot
 * grow past it: memory stays within the limits whatever the archive says.
 */
import { unzipSync } from 'fflate';
import { ExchangeError } from './errors.js';

export interface ZipLimits {
  /** Largest archive accepted (bytes). */
  maxBytes: number;
  /** Largest single entry once unpacked. */
  maxEntryBytes: number;
  /** Largest total once unpacked. */
  maxTotalBytes: number;
}

export const DEFAULT_ZIP_LIMITS: ZipLimits = { maxBytes: 200 * 1024 * 1024, maxEntryBytes: 100 * 1024 * 1024, maxTotalBytes: 400 * 1024 * 1024 };

const MiB = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MiB`;

export function unsafeEntryName(name: string): boolean {
  return (
    name.includes('\\') ||
    name.startsWith('/') ||
    /^[a-zA-Z]:/.test(name) ||
    name.includes('\u0000') ||
    name.split('/').some((part) => part === '..')
  );
}

/** Unpacks the entries `want` accepts (by name); refuses the archive on the first unsafe name or size. */
export function readZip(bytes: Uint8Array, want: (name: string) => boolean, limits: ZipLimits = DEFAULT_ZIP_LIMITS): Map<string, Uint8Array> {
  if (bytes.byteLength > limits.maxBytes) throw new ExchangeError('too_large', `the archive is ${MiB(bytes.byteLength)}, over the limit of ${MiB(limits.maxBytes)}`);
  if (bytes.byteLength < 4 || bytes[0] !== 0x50 || bytes[1] !== 0x4b) throw new ExchangeError('not_zip', 'the file is not a ZIP archive (a .qdpx file is one)');
  let problem: ExchangeError | null = null;
  let total = 0;
  let files: Record<string, Uint8Array>;
  try {
    files = unzipSync(bytes, {
      filter: (f) => {
        if (problem) return false;
        if (unsafeEntryName(f.name)) {
          problem = new ExchangeError('unsafe_path', `the archive holds an entry named "${f.name}", which points outside the archive; nothing was imported`);
          return false;
        }
        if (!want(f.name)) return false;
        if (f.originalSize > limits.maxEntryBytes) {
          problem = new ExchangeError('too_large', `entry "${f.name}" unpacks to ${MiB(f.originalSize)}, over the limit of ${MiB(limits.maxEntryBytes)}`);
          return false;
        }
        total += f.originalSize;
        if (total > limits.maxTotalBytes) {
          problem = new ExchangeError('too_large', `the archive unpacks to more than ${MiB(limits.maxTotalBytes)}`);
          return false;
        }
        return true;
      },
    });
  } catch (err) {
    if (problem) throw problem;
    throw new ExchangeError('not_zip', `the ZIP archive cannot be read (${err instanceof Error ? err.message : String(err)})`);
  }
  if (problem) throw problem;
  return new Map(Object.entries(files));
}
