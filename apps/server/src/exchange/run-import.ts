/** One REFI-QDA import, for the HTTP route and the CLI alike: parse (all or nothing), then write (one transaction). */
import type { Db } from '@gloss/db';
import { ExchangeError, importQdc, importQdpx, type EndReading } from '@gloss/interchange';
import type { DocLoader } from '../projection/load-doc.js';
import { applyImport, type ImportReport, type ImportTarget } from './apply-import.js';

export const IMPORT_FORMATS = ['qdc', 'qdpx'] as const;
export type ImportFormat = (typeof IMPORT_FORMATS)[number];

export interface RunImportOptions {
  endPosition?: EndReading | 'auto';
  onProgress?: (fraction: number) => void;
  maxBytes?: number;
}

export async function runImport(db: Db, store: DocLoader, target: ImportTarget, format: ImportFormat, bytes: Uint8Array, actorId: string, opts: RunImportOptions = {}): Promise<ImportReport> {
  let data;
  if (format === 'qdc') {
    let xml: string;
    try {
      xml = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    } catch {
      throw new ExchangeError('bad-encoding', 'the codebook file is not UTF-8 text');
    }
    data = importQdc(xml);
  } else {
    data = importQdpx(bytes, {
      ...(opts.endPosition ? { endPosition: opts.endPosition } : {}),
      ...(opts.onProgress ? { onProgress: (f: number) => opts.onProgress!(f * 0.8) } : {}),
      ...(opts.maxBytes ? { limits: { maxBytes: opts.maxBytes } } : {}),
    });
  }
  if ('newStudy' in target && !target.newStudy.title.trim()) target = { newStudy: { title: data.title || 'Imported study' } };
  const report = await applyImport(db, store, target, data, actorId, format);
  opts.onProgress?.(1);
  return report;
}
