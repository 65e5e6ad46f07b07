/** One REFI-QDA import, for the HTTP route and the CLI alike: parse (all or nothing), then write (one transaction). */
import type { Db } from '@gloss/db';
import type { EndReading } from '@gloss/interchange';
import { inlineHeavy, type HeavyWork } from '../heavy/pool.js';
import type { DocLoader } from '../projection/load-doc.js';
import { applyImport, type ImportReport, type ImportTarget } from './apply-import.js';

export const IMPORT_FORMATS = ['qdc', 'qdpx'] as const;
export type ImportFormat = (typeof IMPORT_FORMATS)[number];

export interface RunImportOptions {
  endPosition?: EndReading | 'auto';
  onProgress?: (fraction: number) => void;
  maxBytes?: number;
  /** Where the file is read (a worker thread in the server); default in place. */
  heavy?: HeavyWork;
}

export async function runImport(db: Db, store: DocLoader, target: ImportTarget, format: ImportFormat, bytes: Uint8Array, actorId: string, opts: RunImportOptions = {}): Promise<ImportReport> {
  const progress = opts.onProgress;
  const data = await (opts.heavy ?? inlineHeavy()).run(
    'refi',
    { format, bytes, options: { ...(opts.endPosition ? { endPosition: opts.endPosition } : {}), ...(opts.maxBytes ? { maxBytes: opts.maxBytes } : {}) } },
    progress ? { onProgress: (f) => progress(f * 0.8) } : {},
  );
  if ('newStudy' in target && !target.newStudy.title.trim()) target = { newStudy: { title: data.title || 'Imported study' } };
  const report = await applyImport(db, store, target, data, actorId, format);
  opts.onProgress?.(1);
  return report;
}
