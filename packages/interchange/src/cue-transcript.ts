/**
 * The second pass of the caption importers (SRT, WebVTT): once every cue has been read, speaker
 * labels are judged over the whole file (a label counts when it recurs), each cue is split into
 * speaker pieces, and cues become turns.
 */
import type { Transcript } from '@gloss/model';
import { cueLineCandidate, turnsFromCues, type Cue, type CuePiece } from './cue-turns.js';
import type { ImportFormat } from './import-error.js';
import type { ImportOptions } from './options.js';
import { requireWords, withTitle } from './plain-text.js';
import type { ProgressReporter } from './progress.js';
import { SpeakerJudge } from './speaker-label.js';
import { STEP_SIZE, type Steps } from './steps.js';

/** A cue as the first pass reads it: timing and payload lines, speakers not yet known. */
export interface RawCue {
  startMs: number;
  endMs: number;
  payload: string[];
}

/** Progress runs from half way (the first pass reported the first half) to done. */
export function* transcriptFromRawCues<C extends RawCue>(
  raw: readonly C[],
  piecesOf: (cue: C, judge: SpeakerJudge) => CuePiece[],
  format: ImportFormat,
  opts: ImportOptions,
  progress: ProgressReporter,
): Steps<Transcript> {
  const judge = SpeakerJudge.fromLines(
    raw.flatMap((c) => c.payload),
    cueLineCandidate,
  );
  const cues: Cue[] = [];
  for (let k = 0; k < raw.length; k++) {
    if (k % STEP_SIZE === STEP_SIZE - 1) yield;
    progress.tick(raw.length + k, raw.length * 2);
    const c = raw[k]!;
    cues.push({ startMs: c.startMs, endMs: c.endMs, pieces: piecesOf(c, judge) });
  }
  const turns = turnsFromCues(cues, opts.mergeCues ?? true);
  requireWords(turns, format);
  progress.done();
  return withTitle(turns, opts.title);
}
