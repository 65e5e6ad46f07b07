import * as Y from 'yjs';
import type { Transcript } from './transcript.js';
import { InvalidArgumentError, InvalidRangeError } from './errors.js';

/** Root names of the text document (DESIGN §2: a contract with the server, scripts and tests). */
export const TEXT_ROOT = 'text';
export const TURNS_ROOT = 'turns';
/** Turns are joined with one newline; the newline belongs to the turn before it. */
export const TURN_SEPARATOR = '\n';

/** An empty text document. `gc: false` keeps deleted items so anchors into deleted text and snapshots still resolve. */
export function newTextDoc(): Y.Doc {
  return new Y.Doc({ gc: false });
}

export function getText(doc: Y.Doc): Y.Text {
  return doc.getText(TEXT_ROOT);
}

export function getTurnsArray(doc: Y.Doc): Y.Array<Y.Map<unknown>> {
  return doc.getArray<Y.Map<unknown>>(TURNS_ROOT);
}

/** Build a text document from an imported transcript: the words turn by turn, and one turn map per turn. */
export function createTextDoc(transcript: Transcript): Y.Doc {
  checkTranscript(transcript);
  const doc = newTextDoc();
  const text = getText(doc);
  const turns = getTurnsArray(doc);
  doc.transact(() => {
    const starts: number[] = [];
    let joined = '';
    transcript.turns.forEach((turn, i) => {
      starts.push(joined.length);
      joined += turn.text + (i < transcript.turns.length - 1 ? TURN_SEPARATOR : '');
    });
    text.insert(0, joined);
    const maps = transcript.turns.map((turn, i) => {
      const m = new Y.Map<unknown>();
      m.set('speaker', turn.speaker ?? null);
      m.set('startMs', turn.startMs ?? null);
      m.set('endMs', turn.endMs ?? null);
      // A turn's start sticks to its first character (assoc 0), so a correction typed at the end of
      // the previous turn stays in the previous turn.
      m.set('start', Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(text, starts[i]!, 0)));
      return m;
    });
    turns.push(maps);
  });
  return doc;
}

/** The plain text of the transcript. */
export function readText(doc: Y.Doc): string {
  return getText(doc).toString();
}

/** A correction or de-identification: an ordinary Y.Text delete then insert at `index`. */
export function correctText(doc: Y.Doc, index: number, deleteCount: number, insert = ''): void {
  const text = getText(doc);
  if (!Number.isInteger(index) || !Number.isInteger(deleteCount) || index < 0 || deleteCount < 0 || index + deleteCount > text.length) {
    throw new InvalidRangeError(`correction [${index}, ${index + deleteCount}) is outside the text (length ${text.length})`);
  }
  doc.transact(() => {
    if (deleteCount > 0) text.delete(index, deleteCount);
    if (insert.length > 0) text.insert(index, insert);
  });
}

/**
 * Importers and API callers hand over plain data; a malformed transcript is refused before anything is
 * built. A missing (undefined) speaker or time is taken as null.
 */
function checkTranscript(t: Transcript): void {
  if (t === null || typeof t !== 'object' || !Array.isArray(t.turns)) throw new InvalidArgumentError('a transcript needs a turns array');
  t.turns.forEach((turn, i) => {
    const ok =
      turn !== null && typeof turn === 'object' && typeof turn.text === 'string' &&
      (turn.speaker == null || typeof turn.speaker === 'string') &&
      (turn.startMs == null || (typeof turn.startMs === 'number' && Number.isFinite(turn.startMs))) &&
      (turn.endMs == null || (typeof turn.endMs === 'number' && Number.isFinite(turn.endMs)));
    if (!ok) throw new InvalidArgumentError(`turn ${i} must have text (string), speaker (string|null), startMs and endMs (number|null)`);
  });
}
