import { AgreementError, shown } from './errors.js';

/** One coder's coded segment: half-open character offsets [start, end) into the text. */
export interface CodedSegment {
  coderId: string;
  codeId: string;
  start: number;
  end: number;
}

/** A stretch of text used as a fixed unit (speaker turn, paragraph, sentence). */
export interface TextUnit {
  start: number;
  end: number;
}

/**
 * One text as agreement sees it: plain arrays, no Yjs. `coders` lists who coded the text (a coder with
 * no segments still coded it: every code is absent). When omitted, the study's coder list is used.
 */
export interface CodedText {
  textId: string;
  textLength: number;
  units?: ReadonlyArray<TextUnit>;
  coders?: ReadonlyArray<string>;
  segments: ReadonlyArray<CodedSegment>;
}

export function checkCodedText(text: CodedText): void {
  if (!text || typeof text !== 'object') throw new AgreementError('invalid-input', 'a text must be an object');
  const where = `text ${String(text.textId)}`;
  if (!Number.isSafeInteger(text.textLength) || text.textLength < 0) throw new AgreementError('invalid-input', `${where}: textLength must be a non-negative integer`);
  if (!Array.isArray(text.segments)) throw new AgreementError('invalid-input', `${where}: segments must be an array`);
  for (const s of text.segments) {
    if (!s || typeof s.coderId !== 'string' || typeof s.codeId !== 'string')
      throw new AgreementError('invalid-input', `${where}: each segment needs a coderId and a codeId (strings)`);
    checkRange(s, text.textLength, `${where}: segment of ${s.coderId} (${s.codeId})`);
  }
  if (text.units !== undefined) {
    if (!Array.isArray(text.units)) throw new AgreementError('invalid-input', `${where}: units must be an array`);
    for (const u of text.units) checkRange(u, text.textLength, `${where}: unit`);
  }
}

function checkRange(r: { start: number; end: number }, length: number, what: string): void {
  if (!r || typeof r !== 'object') throw new AgreementError('invalid-input', `${what} must be an object with start and end`);
  if (!Number.isSafeInteger(r.start) || !Number.isSafeInteger(r.end) || r.start >= r.end)
    throw new AgreementError('invalid-value', `${what} needs integer offsets with start < end, got [${shown(r.start)}, ${shown(r.end)})`);
  if (r.start < 0 || r.end > length) throw new AgreementError('span-outside-continuum', `${what} [${r.start}, ${r.end}) lies outside the text (length ${length})`);
}

/** Merges overlapping ranges (touching ones stay apart). Input need not be sorted. */
export function mergeOverlapping<T extends { start: number; end: number }>(ranges: ReadonlyArray<T>): Array<{ start: number; end: number }> {
  const sorted = [...ranges].sort((a, b) => a.start - b.start || a.end - b.end);
  const out: Array<{ start: number; end: number }> = [];
  for (const r of sorted) {
    const last = out[out.length - 1];
    if (last && r.start < last.end) last.end = Math.max(last.end, r.end);
    else out.push({ start: r.start, end: r.end });
  }
  return out;
}
