/**
 * A text document's first state from a transcript, built by @gloss/model (which owns the layout:
 * root Y.Text "text" plus the "turns" array), and plain text parsed by @gloss/interchange's importer.
 */
import { parsePlainText, ImportError } from '@gloss/interchange';
import { createTextDoc, type Transcript } from '@gloss/model';
import * as Y from 'yjs';
import { AdminError } from './errors.js';

export function buildTextDocUpdate(transcript: Transcript): { update: Uint8Array; text: string } {
  const doc = createTextDoc(transcript);
  try {
    return { update: Y.encodeStateAsUpdate(doc), text: doc.getText('text').toString() };
  } finally {
    doc.destroy();
  }
}

/** Plain text → transcript (speaker labels and timestamps recognised); import problems become 400s with their place. */
export function transcriptFromPlainText(content: string, title?: string): Transcript {
  try {
    return parsePlainText(content, title === undefined ? {} : { title });
  } catch (err) {
    if (err instanceof ImportError) throw new AdminError('invalid_input', `content: ${err.message}`, { importCode: err.code, line: err.line });
    throw err;
  }
}

export function wordCount(text: string): number {
  return text.match(/\S+/g)?.length ?? 0;
}
