import { ImportError, type ImportFormat } from './import-error.js';
import { DEFAULT_MAX_BYTES } from './options.js';

/** Refuses input over the size limit before any parsing work is done. */
export function checkSize(bytes: Uint8Array, format: ImportFormat, maxBytes = DEFAULT_MAX_BYTES): void {
  if (bytes.byteLength > maxBytes) {
    throw new ImportError({
      code: 'too_large',
      format,
      message: `the file is ${formatBytes(bytes.byteLength)}, over the limit of ${formatBytes(maxBytes)}`,
    });
  }
}

function formatBytes(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / 1024 / 1024).toFixed(1)} MiB`;
}
