import type { Transcript, TranscriptTurn } from '@gloss/model';
import { decodeText } from './decode-text.js';
import { ImportError, type ImportFormat } from './import-error.js';
import { checkSize } from './limits.js';
import type { ImportOptions } from './options.js';
import { ProgressReporter } from './progress.js';
import { matchLabelCandidate, matchSpeakerHeading, SpeakerJudge } from './speaker-label.js';
import { runAsync, runSync, STEP_SIZE, type Steps } from './steps.js';
import { matchStamp, matchWholeStamp } from './transcript-stamp.js';

/** One line of source text and where it came from (a line number, or a DOCX paragraph number). */
export interface SourceLine {
  text: string;
  at: number;
}

export interface LineRules {
  format: ImportFormat;
  /** How `at` is named in error messages. */
  unit: 'line' | 'paragraph';
}

/**
 * Transcript turns from lines of text.
 * - A line that starts with a speaker label and/or a timestamp starts a turn; the timestamp may come
 *   before or after the label (`[00:01:02] I: ...`, `I: [00:01:02] ...`, `I [00:01:02]: ...`), and may
 *   be bare if it has three fields (`00:01:02 I: ...`).
 * - A line holding only a speaker and a time (`Dana Whitfield  0:03`) starts that speaker's turn,
 *   whose words follow on the next lines.
 * - A line holding only a timestamp gives its time to the turn that starts on the next line.
 * - Other lines continue the current turn (joined with a line break). After a blank line, a line
 *   without a label continues the current speaker's turn as a new paragraph (joined with a blank
 *   line), since a long answer often spans paragraphs; without a current speaker it starts an
 *   unlabelled turn, so field notes without speakers become one turn per paragraph.
 */
export function parseTranscriptLines(lines: readonly SourceLine[], rules: LineRules, progress?: ProgressReporter): TranscriptTurn[] {
  return runSync(transcriptLineSteps(lines, rules, progress));
}

/** {@link parseTranscriptLines} as resumable steps, pausing every {@link STEP_SIZE} lines. */
export function* transcriptLineSteps(lines: readonly SourceLine[], rules: LineRules, progress?: ProgressReporter): Steps<TranscriptTurn[]> {
  const judge = SpeakerJudge.fromLines(
    lines.map((l) => l.text),
    candidateLabel,
  );
  const turns: TranscriptTurn[] = [];
  let current: TranscriptTurn | null = null;
  let pendingStart: number | null = null;
  let afterBlank = true;

  const startTurn = (speaker: string | null, startMs: number | null, text: string): void => {
    current = { speaker, startMs, endMs: null, text };
    turns.push(current);
  };

  for (let i = 0; i < lines.length; i++) {
    if (i % STEP_SIZE === STEP_SIZE - 1) yield;
    progress?.tick(i, lines.length);
    const { text: raw, at } = lines[i]!;
    const line = raw.trim();
    if (line === '') {
      afterBlank = true;
      continue;
    }
    const head = readHead(raw, at, judge, rules);
    if (head.labelled || head.startMs !== null) {
      if (!head.labelled && head.rest === '') {
        pendingStart = head.startMs;
        current = null;
      } else {
        startTurn(head.speaker, head.startMs ?? pendingStart, head.rest);
        pendingStart = null;
      }
    } else if (current === null || pendingStart !== null) {
      startTurn(null, pendingStart, line);
      pendingStart = null;
    } else {
      const turn: TranscriptTurn = current;
      if (afterBlank && turn.speaker === null) startTurn(null, null, line);
      else turn.text = turn.text === '' ? line : turn.text + (afterBlank ? '\n\n' : '\n') + line;
    }
    afterBlank = false;
  }
  progress?.done();
  return turns;
}

interface Head {
  labelled: boolean;
  speaker: string | null;
  startMs: number | null;
  rest: string;
}

function readHead(raw: string, at: number, judge: SpeakerJudge, rules: LineRules): Head {
  let s = raw.trimStart();
  let startMs: number | null = null;
  const column = (): number => raw.length - s.length + 1;
  const takeStamp = (): void => {
    const st = matchStamp(s);
    if (!st) return;
    if (!st.ok) throw badStamp(st.text, at, column(), rules);
    if (startMs === null) startMs = st.ms;
    s = s.slice(st.length).trimStart();
  };
  takeStamp();
  if (startMs === null) {
    const heading = matchSpeakerHeading(s);
    if (heading && judge.accepts(heading.label)) {
      const st = matchWholeStamp(heading.stamp);
      if (st && !st.ok) throw badStamp(st.text, at, column() + heading.stampIndex, rules);
      return { labelled: true, speaker: heading.label, startMs: st?.ok ? st.ms : null, rest: '' };
    }
  }
  const cand = matchLabelCandidate(s);
  if (cand && judge.accepts(cand.label)) {
    if (cand.stamp) {
      const st = matchStamp(cand.stamp.text);
      if (st && !st.ok) throw badStamp(st.text, at, column() + cand.stamp.index, rules);
      if (st?.ok && startMs === null) startMs = st.ms;
    }
    s = s.slice(cand.end).trimStart();
    takeStamp();
    return { labelled: true, speaker: cand.label, startMs, rest: s.trimEnd() };
  }
  return { labelled: false, speaker: null, startMs, rest: s.trimEnd() };
}

function candidateLabel(line: string): string | null {
  let s = line.trimStart();
  const st = matchStamp(s);
  if (st) s = s.slice(st.length).trimStart();
  return matchLabelCandidate(s)?.label ?? (st ? null : (matchSpeakerHeading(s)?.label ?? null));
}

function badStamp(text: string, at: number, column: number, rules: LineRules): ImportError {
  return new ImportError({
    code: 'bad_timestamp',
    format: rules.format,
    line: at,
    column,
    unit: rules.unit,
    message: `timestamp '${text}' has minutes or seconds of 60 or more`,
  });
}

/** Fails with `empty` when no turn holds any words. */
export function requireWords(turns: TranscriptTurn[], format: ImportFormat): void {
  if (!turns.some((t) => t.text.trim() !== '')) {
    throw new ImportError({ code: 'empty', format, message: 'the file contains no transcript text' });
  }
}

/** A plain-text transcript from already decoded text. */
export function parsePlainText(text: string, opts: ImportOptions = {}): Transcript {
  return runSync(plainTextSteps(text, opts));
}

function* plainTextSteps(text: string, opts: ImportOptions): Steps<Transcript> {
  const progress = new ProgressReporter(opts.onProgress);
  const lines = text
    .replace(/^\uFEFF/, '')
    .replace(/\r\n?/g, '\n')
    .split('\n')
    .map((t, i) => ({ text: t, at: i + 1 }));
  const turns = yield* transcriptLineSteps(lines, { format: 'text', unit: 'line' }, progress);
  requireWords(turns, 'text');
  return withTitle(turns, opts.title);
}

/** A plain-text transcript (UTF-8 unless `opts.encoding` says otherwise). */
export async function importPlainText(bytes: Uint8Array, opts: ImportOptions = {}): Promise<Transcript> {
  checkSize(bytes, 'text', opts.maxBytes);
  return runAsync(plainTextSteps(decodeText(bytes, 'text', opts.encoding), opts));
}

export function withTitle(turns: TranscriptTurn[], title: string | undefined): Transcript {
  return title === undefined ? { turns } : { title, turns };
}
