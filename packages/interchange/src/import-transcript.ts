import type { Transcript } from '@gloss/model';
import { importDocx } from './docx.js';
import { ImportError, type ImportFormat } from './import-error.js';
import { checkSize } from './limits.js';
import type { ImportOptions } from './options.js';
import { importPlainText } from './plain-text.js';
import { importSrt } from './srt.js';
import { importWebVtt } from './webvtt.js';

export interface ImportInput {
  filename: string;
  bytes: Uint8Array;
  mediaType?: string;
}

type Importer = (bytes: Uint8Array, opts: ImportOptions) => Promise<Transcript>;
const IMPORTERS: Record<Exclude<ImportFormat, 'unknown'>, Importer> = {
  text: importPlainText,
  webvtt: importWebVtt,
  srt: importSrt,
  docx: importDocx,
};

const BY_EXTENSION: Record<string, ImportFormat> = {
  txt: 'text', text: 'text', vtt: 'webvtt', webvtt: 'webvtt', srt: 'srt', docx: 'docx',
};
const BY_MEDIA_TYPE: Record<string, ImportFormat> = {
  'text/plain': 'text',
  'text/vtt': 'webvtt',
  'application/x-subrip': 'srt',
  'text/srt': 'srt',
  'application/srt': 'srt',
  'application/vnd.openxmlformats-officedocument.wordprocessingml.document': 'docx',
};
/** Formats people will try that no importer reads, with what to do instead. */
const REFUSED: Record<string, string> = {
  doc: 'an old Word .doc file; save it as .docx and import that',
  rtf: 'an RTF file; save it as .docx or plain text',
  odt: 'an OpenDocument text; save it as .docx or plain text',
  pdf: 'a PDF; export its text as .docx or plain text',
  pages: 'a Pages document; export it as .docx',
};

export const SUPPORTED_EXTENSIONS = Object.keys(BY_EXTENSION).map((e) => `.${e}`);

/**
 * Chooses the importer by file extension, then media type, then by sniffing the first bytes, and
 * returns the whole transcript or throws an {@link ImportError}. The title defaults to the file name
 * without its extension.
 */
export async function importTranscript(input: ImportInput, opts: ImportOptions = {}): Promise<Transcript> {
  const format = detectFormat(input);
  checkSize(input.bytes, format, opts.maxBytes);
  if (format === 'unknown') {
    throw new ImportError({
      code: 'unsupported_format',
      format,
      message: `cannot import '${input.filename}': supported are ${SUPPORTED_EXTENSIONS.join(', ')}`,
    });
  }
  const title = opts.title ?? stem(input.filename);
  return IMPORTERS[format](input.bytes, { ...opts, ...(title ? { title } : {}) });
}

/** The format an input will be read as; throws `unsupported-format` for known but unreadable kinds. */
export function detectFormat(input: ImportInput): ImportFormat {
  const ext = /\.([^./\\]+)$/.exec(input.filename)?.[1]?.toLowerCase();
  if (ext !== undefined && REFUSED[ext]) {
    throw new ImportError({ code: 'unsupported_format', format: 'unknown', message: `'${input.filename}' is ${REFUSED[ext]}` });
  }
  const byExt = ext === undefined ? undefined : BY_EXTENSION[ext];
  if (byExt) return byExt;
  const media = input.mediaType?.split(';')[0]?.trim().toLowerCase();
  const byMedia = media === undefined ? undefined : BY_MEDIA_TYPE[media];
  if (byMedia) return byMedia;
  return sniff(input.bytes);
}

/** Recognises a format from content: ZIP signature, WEBVTT signature, SRT cue shape, else text. */
export function sniff(bytes: Uint8Array): ImportFormat {
  if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 3 && bytes[3] === 4) return 'docx';
  const label = bytes[0] === 0xff && bytes[1] === 0xfe ? 'utf-16le' : bytes[0] === 0xfe && bytes[1] === 0xff ? 'utf-16be' : 'utf-8';
  const head = new TextDecoder(label).decode(bytes.subarray(0, 1024)).replace(/^\uFEFF/, '');
  if (/^WEBVTT(?:[ \t\r\n]|$)/.test(head)) return 'webvtt';
  if (/^\s*\d+\r?\n[ \t]*(?:\d{1,3}:)?\d{1,2}:\d{1,2}[,.]\d{1,3}[ \t]*-->/.test(head)) return 'srt';
  if (head.length > 0 && !/[\u0000-\u0008\u000e-\u001f]/.test(head)) return 'text';
  return 'unknown';
}

function stem(filename: string): string {
  const base = filename.split(/[/\\]/).pop() ?? filename;
  return base.replace(/\.[^.]+$/, '');
}
