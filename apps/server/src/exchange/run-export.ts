/**
 * One export of a study, in any of the formats, for the HTTP route and the CLI alike: the bytes come
 * as an async iterable (the segments CSV text by text), progress as a rising fraction, and the export
 * is written to the audit log (who, which format, when) before the first byte leaves.
 */
import type { Db } from '@gloss/db';
import {
  codebookCsv,
  codebookMarkdown,
  codebookQdc,
  memosMarkdown,
  segmentsCsv,
  type ExSegment,
  type StudyData,
  type TextWithSegments,
} from '@gloss/interchange';
import { recordAudit } from '../admin/audit.js';
import { inlineHeavy, type HeavyWork } from '../heavy/pool.js';
import { HttpError } from '../errors.js';
import type { DocLoader } from '../projection/load-doc.js';
import { loadStudy, type LoadOptions } from './load-study.js';

export const EXPORT_FORMATS = ['csv', 'codebook-md', 'codebook-csv', 'memos-md', 'qdc', 'qdpx'] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

export function isExportFormat(s: unknown): s is ExportFormat {
  return typeof s === 'string' && (EXPORT_FORMATS as readonly string[]).includes(s);
}

const TYPES: Record<ExportFormat, { type: string; ext: string; suffix: string }> = {
  csv: { type: 'text/csv; charset=utf-8; header=present', ext: 'csv', suffix: 'segments' },
  'codebook-md': { type: 'text/markdown; charset=utf-8', ext: 'md', suffix: 'codebook' },
  'codebook-csv': { type: 'text/csv; charset=utf-8; header=present', ext: 'csv', suffix: 'codebook' },
  'memos-md': { type: 'text/markdown; charset=utf-8', ext: 'md', suffix: 'memos' },
  qdc: { type: 'application/xml; charset=utf-8', ext: 'qdc', suffix: 'codebook' },
  qdpx: { type: 'application/zip', ext: 'qdpx', suffix: 'project' },
};

export interface ExportResult {
  contentType: string;
  filename: string;
  body: AsyncIterable<Uint8Array>;
}

export interface ExportOptions extends LoadOptions {
  /** The account exporting; null for the command line run by an administrator. */
  actorId: string | null;
  via: 'http' | 'cli';
  onProgress?: (fraction: number) => void;
  /** Where the project archive is packed (a worker thread in the server); default in place. */
  heavy?: HeavyWork;
}

function fileStem(title: string): string {
  return title.normalize('NFKD').replace(/[^\w\- ]+/g, '').trim().replace(/\s+/g, '-').slice(0, 60).toLowerCase() || 'study';
}

const enc = new TextEncoder();
async function* encode(parts: AsyncIterable<string> | Iterable<string>): AsyncGenerator<Uint8Array> {
  for await (const p of parts) if (p) yield enc.encode(p);
}

export async function runExport(db: Db, store: DocLoader, studyId: string, format: ExportFormat, opts: ExportOptions): Promise<ExportResult> {
  if (opts.layers === 'consensus' && format !== 'csv') {
    throw new HttpError(400, 'bad_request', 'Consensus layers go out in the segments CSV only: the REFI-QDA standard has no place for them, and codebooks and memos have no segments.');
  }
  const study = await loadStudy(db, store, studyId, opts);
  const { frame } = study;
  if (format === 'qdc' && frame.codes.length === 0) {
    throw new HttpError(409, 'conflict', 'The codebook has no codes yet; a codebook file needs at least one (the standard requires it).');
  }
  await recordAudit(db, {
    userId: opts.actorId,
    studyId,
    action: 'export',
    target: studyId,
    detail: { format, via: opts.via, layers: opts.layers ?? 'coders', texts: study.textList.length, codes: frame.codes.length, memos: frame.memos.length },
  });
  const t = TYPES[format];
  const filename = `${fileStem(frame.title)}-${opts.layers === 'consensus' ? 'consensus-' : ''}${t.suffix}.${t.ext}`;
  const progress = opts.onProgress;
  const total = study.textList.length;
  const collect = async (): Promise<TextWithSegments[]> => {
    const out: TextWithSegments[] = [];
    for await (const x of study.texts()) {
      out.push(x);
      progress?.(total ? (0.9 * out.length) / total : 0.9);
    }
    return out;
  };
  let body: AsyncIterable<Uint8Array>;
  switch (format) {
    case 'csv':
      body = encode(segmentsCsv(frame, study.texts(), { totalTexts: total, ...(progress ? { onProgress: progress } : {}) }));
      break;
    case 'codebook-md':
      body = encode([codebookMarkdown(frame)]);
      break;
    case 'codebook-csv':
      body = encode([codebookCsv(frame)]);
      break;
    case 'qdc':
      body = encode([codebookQdc(frame, studyId)]);
      break;
    case 'memos-md': {
      body = (async function* () {
        const segments = new Map<string, ExSegment>();
        if (frame.memos.some((m) => m.attachedTo.kind === 'segment')) for (const x of await collect()) for (const s of x.segments) segments.set(s.id, s);
        yield* encode([memosMarkdown(frame, { textTitles: new Map(study.textList.map((x) => [x.id, x.title])), segments })]);
      })();
      break;
    }
    case 'qdpx': {
      body = (async function* () {
        const all = await collect();
        const data: StudyData = { ...frame, texts: all.map((x) => x.text), segments: all.flatMap((x) => x.segments) };
        yield await (opts.heavy ?? inlineHeavy()).run('qdpx', { data, studyId });
      })();
      break;
    }
  }
  return {
    contentType: t.type,
    filename,
    body: (async function* () {
      yield* body;
      progress?.(1);
    })(),
  };
}
