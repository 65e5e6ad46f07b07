/**
 * The heavy jobs, as plain functions of plain data: run in a worker thread by the pool (pool.ts) and,
 * where no pool is running (the command line, bare app tests), in the calling thread. Each takes and
 * returns structured-cloneable values. Typed errors cross the thread boundary as plain records
 * (`packError`) and are rebuilt as the same classes on the other side (`unpackError`), so callers
 * branch on them exactly as before.
 */
import { AgreementError, type AgreementErrorCode } from '@gloss/agreement';
import {
  ExchangeError,
  ImportError,
  importQdc,
  importQdpx,
  importTranscript,
  projectFile,
  projectQdpx,
  type EndReading,
  type ExchangeErrorCode,
  type ImportErrorCode,
  type ImportFormat,
  type ImportInput,
  type RefiImport,
  type StudyData,
} from '@gloss/interchange';
import type { Transcript } from '@gloss/model';
import { agreementReport, type ReportInput, type ServerReport } from '../agreement/report.js';

export interface TranscriptJob {
  upload: ImportInput;
  options: { maxBytes?: number; title?: string };
}

export interface RefiJob {
  format: 'qdc' | 'qdpx';
  bytes: Uint8Array;
  options: { endPosition?: EndReading | 'auto'; maxBytes?: number };
}

export interface QdpxJob {
  data: StudyData;
  studyId: string;
}

type Progress = (fraction: number) => void;

/** A REFI-QDA file read into plain data (all or nothing); the writing happens afterwards, in the database. */
export function parseRefi({ format, bytes, options }: RefiJob, onProgress?: Progress): RefiImport {
  if (format === 'qdc') {
    let xml: string;
    try {
      xml = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    } catch {
      throw new ExchangeError('bad_encoding', 'the codebook file is not UTF-8 text');
    }
    return importQdc(xml);
  }
  return importQdpx(bytes, {
    ...(options.endPosition ? { endPosition: options.endPosition } : {}),
    ...(onProgress ? { onProgress } : {}),
    ...(options.maxBytes ? { limits: { maxBytes: options.maxBytes } } : {}),
  });
}

export const JOBS = {
  /** Agreement coefficients, with bootstrap when asked (up to 10,000 replicates). */
  agreement: (input: ReportInput): ServerReport => agreementReport(input),
  /** A transcript file (plain text, WebVTT, SRT, DOCX) read into turns. */
  transcript: ({ upload, options }: TranscriptJob, onProgress?: Progress): Promise<Transcript> =>
    importTranscript(upload, { ...options, ...(onProgress ? { onProgress } : {}) }),
  refi: (job: RefiJob, onProgress?: Progress): RefiImport => parseRefi(job, onProgress),
  /** A REFI-QDA project archive (XML plus sources, deflated). */
  qdpx: ({ data, studyId }: QdpxJob): Uint8Array => projectQdpx(projectFile(data, studyId)),
} as const;

export type JobName = keyof typeof JOBS;
export type JobInput<K extends JobName> = Parameters<(typeof JOBS)[K]>[0];
export type JobOutput<K extends JobName> = Awaited<ReturnType<(typeof JOBS)[K]>>;

/** A typed error as it crosses between threads. */
export type PackedError =
  | { kind: 'agreement'; code: AgreementErrorCode; message: string }
  | { kind: 'import'; code: ImportErrorCode; message: string; format: ImportFormat; line: number | null; column: number | null }
  | { kind: 'exchange'; code: ExchangeErrorCode; message: string };

export function packError(err: unknown): PackedError | null {
  if (err instanceof AgreementError) return { kind: 'agreement', code: err.code, message: err.message };
  if (err instanceof ImportError) return { kind: 'import', ...err.toJSON() };
  if (err instanceof ExchangeError) return { kind: 'exchange', code: err.code, message: err.message };
  return null;
}

export function unpackError(p: PackedError): Error {
  switch (p.kind) {
    case 'agreement':
      return new AgreementError(p.code, p.message);
    case 'exchange':
      return new ExchangeError(p.code, p.message);
    case 'import': {
      // The message already names the place; the constructor would name it again.
      const err = new ImportError({ code: p.code, format: p.format, message: p.message });
      Object.defineProperty(err, 'line', { value: p.line });
      Object.defineProperty(err, 'column', { value: p.column ?? undefined });
      return err;
    }
  }
}
