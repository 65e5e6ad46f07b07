import type { TranscriptTurn } from '@gloss/model';
import { matchLabelCandidate, type SpeakerJudge } from './speaker-label.js';

/** Part of a cue's words said by one speaker (null when the file does not say who). */
export interface CuePiece {
  speaker: string | null;
  text: string;
}

/** A parsed caption cue: its timing and its words split by speaker. */
export interface Cue {
  startMs: number;
  endMs: number;
  pieces: CuePiece[];
}

// A dialogue dash: '- What?' or '-What?', but not '-5 degrees' or '--'.
const DASH = /^[-‐‑–—](?=[\s\p{L}"'‘“(\[])\s*/u;

/**
 * Splits caption lines that carry no voice markup into speaker pieces: a dialogue dash (`- `) starts
 * a new piece, and so does an accepted `NAME:` label (after a dash or at the start of a line). Lines
 * of one piece are joined with a space: caption line breaks are layout, not structure.
 */
export function piecesFromLines(lines: readonly string[], judge: SpeakerJudge): CuePiece[] {
  const pieces: CuePiece[] = [];
  let current: CuePiece | null = null;
  for (const raw of lines) {
    let line = raw.trim();
    if (line === '') continue;
    const dashed = DASH.test(line);
    if (dashed) line = line.replace(DASH, '');
    const cand = matchLabelCandidate(line);
    if (cand && judge.accepts(cand.label)) {
      current = { speaker: cand.label, text: line.slice(cand.end).trim() };
      pieces.push(current);
    } else if (dashed || current === null) {
      current = { speaker: null, text: line };
      pieces.push(current);
    } else {
      current.text = joinWords(current.text, line);
    }
  }
  return pieces;
}

/** The label candidate of a caption line, after any dialogue dash; for counting recurrences. */
export function cueLineCandidate(line: string): string | null {
  return matchLabelCandidate(line.trim().replace(DASH, ''))?.label ?? null;
}

export function joinWords(a: string, b: string): string {
  if (a === '') return b;
  if (b === '') return a;
  return `${a} ${b}`;
}

/**
 * Turns from cues in file order: one turn per piece, each with its cue's timing. When `merge` is set,
 * a piece continuing the previous turn's named speaker joins that turn (start of the first cue, end
 * of the last). Pieces with no words are dropped: they carry nothing to code.
 */
export function turnsFromCues(cues: readonly Cue[], merge: boolean): TranscriptTurn[] {
  const turns: TranscriptTurn[] = [];
  for (const cue of cues) {
    for (const piece of cue.pieces) {
      const text = piece.text.trim();
      if (text === '') continue;
      const last = turns[turns.length - 1];
      if (merge && last && piece.speaker !== null && last.speaker === piece.speaker) {
        last.text = joinWords(last.text, text);
        last.endMs = Math.max(last.endMs ?? cue.endMs, cue.endMs);
      } else {
        turns.push({ speaker: piece.speaker, startMs: cue.startMs, endMs: cue.endMs, text });
      }
    }
  }
  return turns;
}
