import type { Transcript } from '@gloss/model';
import { XMLParser } from 'fast-xml-parser';
import { unzipSync } from 'fflate';
import mammoth from 'mammoth';
import { ImportError } from './import-error.js';
import { checkSize } from './limits.js';
import { DEFAULT_MAX_BYTES, type ImportOptions } from './options.js';
import { requireWords, transcriptLineSteps, withTitle, type SourceLine } from './plain-text.js';
import { ProgressReporter } from './progress.js';
import { runAsync } from './steps.js';

/** A DOCX compresses text about tenfold; past this many unpacked bytes per packed byte it is refused. */
const MAX_UNPACK_RATIO = 40;
const MAIN_DOCUMENT_TYPE = /\/officeDocument$/;

/**
 * A Word (.docx, Office Open XML) transcript. mammoth reads the document; each body paragraph
 * (including those in tables) becomes one paragraph of text, line breaks inside a paragraph become
 * line breaks, and the plain-text rules then find speakers and timestamps. Error locations are
 * paragraph numbers, counted from 1 in document order, empty paragraphs included.
 * Footnotes, comments, headers and footers are not part of the transcript.
 */
export async function importDocx(bytes: Uint8Array, opts: ImportOptions = {}): Promise<Transcript> {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  checkSize(bytes, 'docx', maxBytes);
  const progress = new ProgressReporter(opts.onProgress);
  checkPackage(bytes, maxBytes * MAX_UNPACK_RATIO);
  progress.tick(5, 100);

  const paragraphs = await readParagraphs(bytes);
  progress.tick(50, 100);

  const lines: SourceLine[] = [];
  paragraphs.forEach((text, k) => {
    for (const line of text.split('\n')) lines.push({ text: line, at: k + 1 });
    lines.push({ text: '', at: k + 1 });
  });
  const turns = await runAsync(transcriptLineSteps(lines, { format: 'docx', unit: 'paragraph' }, progress.part(0.5, 1)));
  requireWords(turns, 'docx');
  progress.done();
  return withTitle(turns, opts.title);
}

/** Fails early, with a clear message, on a file that is not a ZIP or has no main document. */
function checkPackage(bytes: Uint8Array, maxUnpacked: number): void {
  if (!(bytes[0] === 0x50 && bytes[1] === 0x4b && (bytes[2] === 3 || bytes[2] === 5))) {
    throw new ImportError({ code: 'not_zip', format: 'docx', message: 'not a .docx file: a .docx is a ZIP archive, and this file is not one' });
  }
  const names: string[] = [];
  let unpacked = 0;
  let entries: Record<string, Uint8Array>;
  try {
    entries = unzipSync(bytes, {
      filter: (f) => {
        names.push(f.name);
        unpacked += f.originalSize;
        return f.name === '_rels/.rels';
      },
    });
  } catch (cause) {
    throw new ImportError({ code: 'not_zip', format: 'docx', message: `the ZIP archive is damaged (${(cause as Error).message})`, cause });
  }
  if (unpacked > maxUnpacked) {
    throw new ImportError({ code: 'too_large', format: 'docx', message: `the document unpacks to ${unpacked} bytes, over the limit of ${maxUnpacked}` });
  }
  const main = mainDocumentPath(entries['_rels/.rels']);
  if (!names.includes(main)) {
    throw new ImportError({
      code: 'no_document',
      format: 'docx',
      message: `the archive has no word-processing document ('${main}' is missing); is it a .docx saved by a word processor?`,
    });
  }
}

function mainDocumentPath(rels: Uint8Array | undefined): string {
  if (!rels) return 'word/document.xml';
  try {
    const xml = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '' }).parse(new TextDecoder().decode(rels));
    const list = [xml?.Relationships?.Relationship ?? []].flat() as Array<{ Type?: string; Target?: string }>;
    const target = list.find((r) => MAIN_DOCUMENT_TYPE.test(r.Type ?? ''))?.Target;
    return target ? target.replace(/^\//, '') : 'word/document.xml';
  } catch {
    // An unreadable relationships part: mammoth will report it; assume the usual location here.
    return 'word/document.xml';
  }
}

interface DocNode {
  type: string;
  value?: string;
  breakType?: string;
  children?: DocNode[];
}

/** Plain text of each body paragraph, through mammoth's document model. */
async function readParagraphs(bytes: Uint8Array): Promise<string[]> {
  let doc: DocNode | null = null;
  try {
    await mammoth.convertToHtml(
      { buffer: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) },
      {
        transformDocument: (d: DocNode) => ((doc = d), d),
        // Images are not text: skip reading them.
        convertImage: mammoth.images.imgElement(() => Promise.resolve({ src: '' })),
      },
    );
  } catch (cause) {
    throw new ImportError({ code: 'bad_docx', format: 'docx', message: `the document could not be read (${(cause as Error).message})`, cause });
  }
  if (doc === null) throw new ImportError({ code: 'bad_docx', format: 'docx', message: 'the document could not be read' });
  const out: string[] = [];
  collectParagraphs(doc, out);
  return out;
}

function collectParagraphs(node: DocNode, out: string[]): void {
  if (node.type === 'paragraph') {
    out.push(inlineText(node));
    return;
  }
  for (const child of node.children ?? []) collectParagraphs(child, out);
}

function inlineText(node: DocNode): string {
  if (node.type === 'text') return node.value ?? '';
  if (node.type === 'tab') return '\t';
  if (node.type === 'break') return node.breakType === 'line' || node.breakType === undefined ? '\n' : ' ';
  return (node.children ?? []).map(inlineText).join('');
}
