import type { Transcript } from '@gloss/model';
import { clockToMs, fractionToMs } from './clock.js';
import { clip, requireCueOrder } from './cue-timing.js';
import { transcriptFromRawCues, type RawCue } from './cue-transcript.js';
import { piecesFromLines } from './cue-turns.js';
import { decodeText } from './decode-text.js';
import { ImportError } from './import-error.js';
import { checkSize } from './limits.js';
import type { ImportOptions } from './options.js';
import { ProgressReporter } from './progress.js';
import { runAsync, runSync, STEP_SIZE, type Steps } from './steps.js';

// `hh:mm:ss,mmm --> hh:mm:ss,mmm`, then optional display coordinates (`X1:... Y2:...`), ignored.
// A '.' decimal mark and a missing hours field are accepted: both are common in files in the wild.
const STAMP = String.raw`(?:(\d{1,3}):)?(\d{1,2}):(\d{1,2})[,.](\d{1,3})`;
const TIMING = new RegExp(String.raw`^\s*${STAMP}\s*-->\s*${STAMP}(?:\s+.*)?$`);
const INDEX = /^\s*\d+\s*$/;
// Basic formatting that subtitle editors write: <i>, <b>, <u>, <s>, <font ...>, and {\an8}-style overrides.
const FORMATTING = /<\/?(?:i|b|u|s|font)(?:\s[^>]*)?>|\{\\[^}]*\}/gi;

/**
 * An SRT (SubRip) subtitle file as a transcript: numbered cues with `hh:mm:ss,mmm --> hh:mm:ss,mmm`
 * timings and one or more lines of text, separated by blank lines. Formatting tags are stripped;
 * speakers come from `NAME:` labels and `- ` dialogue dashes (each dash line is its own turn).
 * Consecutive cues of the same named speaker merge into one turn unless `mergeCues: false`.
 * A missing blank line before a cue number is tolerated; an unreadable or backwards timing is refused.
 */
export function parseSrt(text: string, opts: ImportOptions = {}): Transcript {
  return runSync(srtSteps(text, opts));
}

function* srtSteps(text: string, opts: ImportOptions): Steps<Transcript> {
  const progress = new ProgressReporter(opts.onProgress);
  const lines = text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n').split('\n');
  const isCueStart = (i: number): boolean =>
    (INDEX.test(lines[i] ?? '') && TIMING.test(lines[i + 1] ?? '')) || TIMING.test(lines[i] ?? '');

  const raw: RawCue[] = [];
  let pos = 0;
  let pauseAt = STEP_SIZE;
  while (pos < lines.length) {
    if (pos >= pauseAt) {
      pauseAt = pos + STEP_SIZE;
      yield;
    }
    progress.tick(pos, lines.length * 2);
    const line = lines[pos]!;
    if (line.trim() === '') {
      pos++;
      continue;
    }
    let timingAt = pos;
    if (INDEX.test(line)) timingAt = pos + 1;
    const timingLine = lines[timingAt];
    if (timingLine === undefined || !timingLine.includes('-->')) {
      throw new ImportError({
        code: 'missing_timing',
        format: 'srt',
        line: timingAt + 1,
        message:
          timingAt === pos
            ? `expected a cue number or a cue timing ('00:00:01,000 --> 00:00:04,000'), found '${clip(line)}'`
            : `cue ${line.trim()} has no timing line ('00:00:01,000 --> 00:00:04,000') after its number`,
      });
    }
    const { startMs, endMs } = readTiming(timingLine, timingAt + 1);
    pos = timingAt + 1;
    const payload: string[] = [];
    while (pos < lines.length && lines[pos]!.trim() !== '' && !isCueStart(pos)) payload.push(lines[pos++]!);
    raw.push({ startMs, endMs, payload: payload.map((l) => l.replace(FORMATTING, '')) });
  }

  return yield* transcriptFromRawCues(raw, (c, judge) => piecesFromLines(c.payload, judge), 'srt', opts, progress);
}

function readTiming(line: string, lineNo: number): { startMs: number; endMs: number } {
  const m = TIMING.exec(line);
  const toMs = (o: number): number | null =>
    m ? clockToMs(Number(m[o] ?? 0), Number(m[o + 1]), Number(m[o + 2]), fractionToMs(m[o + 3])) : null;
  const startMs = toMs(1);
  const endMs = toMs(5);
  if (startMs === null || endMs === null) {
    throw new ImportError({
      code: 'bad_timing',
      format: 'srt',
      line: lineNo,
      message: `cannot read cue timing '${clip(line.trim())}' (expected 'hh:mm:ss,mmm --> hh:mm:ss,mmm' with minutes and seconds below 60)`,
    });
  }
  requireCueOrder('srt', lineNo, line.trim(), startMs, endMs);
  return { startMs, endMs };
}

/** An SRT file from its bytes (UTF-8 unless `opts.encoding` names another encoding). */
export async function importSrt(bytes: Uint8Array, opts: ImportOptions = {}): Promise<Transcript> {
  checkSize(bytes, 'srt', opts.maxBytes);
  return runAsync(srtSteps(decodeText(bytes, 'srt', opts.encoding), opts));
}
