/**
 * Building a text document's first state from a transcript. Uses @gloss/model's createTextDoc when it
 * is exported (it owns the document's layout); otherwise a Y.Doc({gc:false}) with the words in the
 * root Y.Text "text" (DESIGN §2), so texts can be added before the model lands.
 */
import * as model from '@gloss/model';
import type { Transcript } from '@gloss/model';
import * as Y from 'yjs';

type CreateTextDoc = (t: Transcript) => Y.Doc;

function fallbackTextDoc(transcript: Transcript): Y.Doc {
  const doc = new Y.Doc({ gc: false });
  doc.getText('text').insert(0, transcript.turns.map((t) => t.text).join('\n'));
  return doc;
}

export function buildTextDocUpdate(transcript: Transcript): { update: Uint8Array; text: string } {
  const create = (model as Record<string, unknown>).createTextDoc as CreateTextDoc | undefined;
  const doc = typeof create === 'function' ? create(transcript) : fallbackTextDoc(transcript);
  try {
    return { update: Y.encodeStateAsUpdate(doc), text: doc.getText('text').toString() };
  } finally {
    doc.destroy();
  }
}

/** Plain text → transcript: one turn per non-blank line; "Name: words" lines carry a speaker. */
export function transcriptFromPlainText(content: string, title?: string): Transcript {
  const turns = content
    .replace(/\r\n?/g, '\n')
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line.length > 0)
    .map((line) => {
      const m = /^([\p{L}\p{N}][\p{L}\p{N} ._-]{0,30}):\s+(.+)$/u.exec(line);
      return { speaker: m ? m[1]! : null, startMs: null, endMs: null, text: m ? m[2]! : line };
    });
  return title === undefined ? { turns } : { title, turns };
}

export function wordCount(text: string): number {
  return text.match(/\S+/g)?.length ?? 0;
}
