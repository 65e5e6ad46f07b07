import type { Transcript } from '@gloss/model';
import { clockToMs } from './clock.js';
import { clip, requireCueOrder } from './cue-timing.js';
import { transcriptFromRawCues, type RawCue } from './cue-transcript.js';
import { piecesFromLines, type CuePiece } from './cue-turns.js';
import { decodeText } from './decode-text.js';
import { ImportError } from './import-error.js';
import { checkSize } from './limits.js';
import type { ImportOptions } from './options.js';
import { ProgressReporter } from './progress.js';
import type { SpeakerJudge } from './speaker-label.js';
import { runAsync, runSync, STEP_SIZE, type Steps } from './steps.js';
import { readCueText } from './vtt-cue-text.js';

const SIGNATURE = /^WEBVTT(?:[ \t].*)?$/;
const SPECIAL_BLOCK = /^(?:NOTE|STYLE|REGION)(?:[ \t]|$)/;
// Whitespace around the arrow is required by the syntax but skipped if absent by the parser (§6.1).
const TIMING = /^[ \t]*(\S+?)[ \t]*-->[ \t]*(\S+)(?:[ \t]+(.*))?$/;
const TIMESTAMP = /^(\d+):(\d{2})(?::(\d{2}))?\.(\d{3})$/;

/** WebVTT timestamp (§4.5: `hh:mm:ss.ttt` with hours optional and of any width) to ms, or null. */
export function parseVttTimestamp(s: string): number | null {
  const m = TIMESTAMP.exec(s);
  if (!m) return null;
  if (m[3] === undefined) {
    // Two fields are minutes and seconds; minutes must then be exactly two digits.
    if (m[1]!.length !== 2) return null;
    return clockToMs(0, Number(m[1]), Number(m[2]), Number(m[4]));
  }
  return clockToMs(Number(m[1]), Number(m[2]), Number(m[3]), Number(m[4]));
}

/**
 * A WebVTT file (W3C "WebVTT: The Web Video Text Tracks Format") as a transcript.
 * - The `WEBVTT` signature line is required; header lines after it, STYLE, REGION and NOTE blocks
 *   are skipped; cue identifiers and cue settings are read and ignored.
 * - Speakers come from `<v Name>` voice spans (classes such as `<v.loud Name>` allowed, `</v>`
 *   optional); in cues without voice spans, from `Name:` labels and `- ` dialogue dashes, as
 *   meeting-software transcripts write them.
 * - Consecutive cues of the same named speaker merge into one turn unless `mergeCues: false`.
 * Where a browser would silently drop a cue (unreadable timing, a text block with no timing line),
 * this importer refuses the file with the line, so no words are lost unnoticed; a cue that ends
 * before it starts is refused too (the syntax requires end > start; end = start is tolerated).
 */
export function parseWebVtt(text: string, opts: ImportOptions = {}): Transcript {
  return runSync(webvttSteps(text, opts));
}

function* webvttSteps(text: string, opts: ImportOptions): Steps<Transcript> {
  const progress = new ProgressReporter(opts.onProgress);
  const lines = text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n').replace(/\0/g, '\ufffd').split('\n');
  if (!SIGNATURE.test(lines[0]!)) {
    throw new ImportError({
      code: 'bad_header',
      format: 'webvtt',
      line: 1,
      message: `a WebVTT file must begin with 'WEBVTT', found '${clip(lines[0]!)}'`,
    });
  }
  let pos = 1;
  // Header: lines up to the first blank line, unless a cue timing line comes first.
  while (pos < lines.length && lines[pos] !== '' && !lines[pos]!.includes('-->')) pos++;

  const raw: Array<RawCue & { payloadLine: number }> = [];
  let pauseAt = STEP_SIZE;
  while (pos < lines.length) {
    if (pos >= pauseAt) {
      pauseAt = pos + STEP_SIZE;
      yield;
    }
    progress.tick(pos, lines.length * 2);
    if (lines[pos] === '') {
      pos++;
      continue;
    }
    const first = lines[pos]!;
    if (SPECIAL_BLOCK.test(first) && !first.includes('-->')) {
      while (pos < lines.length && lines[pos] !== '') pos++;
      continue;
    }
    let timingAt = pos;
    if (!first.includes('-->')) {
      // An identifier line, which must be followed by the timing line.
      timingAt = pos + 1;
      if (timingAt >= lines.length || !lines[timingAt]!.includes('-->')) {
        throw new ImportError({
          code: 'missing_timing',
          format: 'webvtt',
          line: pos + 1,
          message: `text block '${clip(first)}' has no cue timing line ('00:01.000 --> 00:04.000') after it`,
        });
      }
    }
    const { startMs, endMs } = readTiming(lines[timingAt]!, timingAt + 1);
    pos = timingAt + 1;
    const payloadLine = pos + 1;
    const payload: string[] = [];
    while (pos < lines.length && lines[pos] !== '' && !lines[pos]!.includes('-->')) payload.push(lines[pos++]!);
    raw.push({ startMs, endMs, payload, payloadLine });
  }

  // Second pass: speakers, now that label recurrences over the whole file are known.
  return yield* transcriptFromRawCues(raw, (c, judge) => cuePieces(c.payload, c.payloadLine, judge), 'webvtt', opts, progress);
}

function cuePieces(payload: string[], firstLine: number, judge: SpeakerJudge): CuePiece[] {
  const text = payload.join('\n');
  const locate = (offset: number): { line: number; column: number } => {
    const before = text.slice(0, offset);
    const nl = before.lastIndexOf('\n');
    return { line: firstLine + (before.match(/\n/g)?.length ?? 0), column: offset - nl };
  };
  const pieces: CuePiece[] = [];
  for (const run of readCueText(text, locate)) {
    if (run.voice === undefined) pieces.push(...piecesFromLines(run.text.split('\n'), judge));
    else pieces.push({ speaker: run.voice, text: run.text.split('\n').map((l) => l.trim()).filter(Boolean).join(' ') });
  }
  return pieces;
}

function readTiming(line: string, lineNo: number): { startMs: number; endMs: number } {
  const m = TIMING.exec(line);
  const startMs = m ? parseVttTimestamp(m[1]!) : null;
  const endMs = m ? parseVttTimestamp(m[2]!) : null;
  if (!m || startMs === null || endMs === null) {
    const bad = m ? (startMs === null ? m[1]! : m[2]!) : null;
    throw new ImportError({
      code: 'bad_timing',
      format: 'webvtt',
      line: lineNo,
      ...(bad === null ? {} : { column: line.indexOf(bad) + 1 }),
      message:
        `cannot read cue timing '${clip(line)}'` +
        (bad === null ? '' : `: '${bad}' is not a timestamp`) +
        ` (expected hh:mm:ss.ttt or mm:ss.ttt, e.g. '00:01.000 --> 00:04.000')`,
    });
  }
  requireCueOrder('webvtt', lineNo, `${m[1]} --> ${m[2]}`, startMs, endMs);
  return { startMs, endMs };
}

/** A WebVTT file from its bytes (always UTF-8, per the specification). */
export async function importWebVtt(bytes: Uint8Array, opts: ImportOptions = {}): Promise<Transcript> {
  checkSize(bytes, 'webvtt', opts.maxBytes);
  return runAsync(webvttSteps(decodeText(bytes, 'webvtt'), opts));
}
