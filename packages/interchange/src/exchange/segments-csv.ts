/**
 * Segments as CSV (RFC 4180, UTF-8): one record per segment, written text by text so a large study
 * streams. Columns: segment and code ids, the code's path, coder, text, offsets both as Unicode code
 * points (as the REFI-QDA standard counts) and as UTF-16 code units (as JavaScript and Gloss count),
 * end exclusive, the quoted words, the speaker and time of the turn the segment starts in, when it was
 * coded, its note and round, and the attributes of the text's cases (one column per attribute; a text
 * of several cases gets their values joined with "; ").
 */
import { OffsetMap } from './code-points.js';
import { CSV_BOM, csvRecord } from './csv.js';
import { codePaths, type ExValue, type StudyFrame, type TextWithSegments } from './study-data.js';

export const SEGMENT_COLUMNS = [
  'segment_id',
  'code_path',
  'code_id',
  'coder',
  'text',
  'text_id',
  'start_code_point',
  'end_code_point',
  'start_utf16',
  'end_utf16',
  'quote',
  'speaker',
  'timestamp',
  'coded_at',
  'note',
  'round',
  'cases',
] as const;

/** h:mm:ss.mmm, or '' when the turn has no time. */
export function formatTimestamp(ms: number | null): string {
  if (ms === null || !Number.isFinite(ms)) return '';
  const t = Math.max(0, Math.round(ms));
  const h = Math.floor(t / 3_600_000);
  const m = Math.floor((t % 3_600_000) / 60_000);
  const s = Math.floor((t % 60_000) / 1000);
  const milli = t % 1000;
  return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}.${String(milli).padStart(3, '0')}`;
}

function valueText(v: ExValue | undefined): string {
  return v === null || v === undefined ? '' : String(v);
}

/** Yields the CSV in pieces: the header, then the records of each text in turn. */
export async function* segmentsCsv(
  frame: StudyFrame,
  texts: AsyncIterable<TextWithSegments> | Iterable<TextWithSegments>,
  opts: { totalTexts?: number; onProgress?: (fraction: number) => void; bom?: boolean } = {},
): AsyncGenerator<string> {
  const paths = codePaths(frame.codes);
  const coders = new Map(frame.coders.map((c) => [c.id, c.name]));
  const attrs = frame.attributes;
  yield (opts.bom === false ? '' : CSV_BOM) + csvRecord([...SEGMENT_COLUMNS, ...attrs.map((a) => `attribute: ${a.name}`)]);
  let done = 0;
  for await (const { text, segments } of texts) {
    const map = new OffsetMap(text.content);
    const cases = frame.cases.filter((c) => c.textIds.includes(text.id));
    const caseCells = [cases.map((c) => c.name).join('; '), ...attrs.map((a) => cases.map((c) => valueText(c.values[a.id])).join('; '))];
    let chunk = '';
    const ordered = [...segments].sort((a, b) => a.start - b.start || a.end - b.end || (a.id < b.id ? -1 : 1));
    for (const s of ordered) {
      const turn = turnAt(text.turns, s.start);
      chunk += csvRecord([
        s.id,
        paths.get(s.codeId) ?? s.codeId,
        s.codeId,
        coders.get(s.coderId) ?? s.coderId,
        text.title,
        text.id,
        map.toCodePoint(s.start),
        map.toCodePoint(s.end),
        s.start,
        s.end,
        s.quote,
        turn?.speaker ?? '',
        formatTimestamp(turn?.startMs ?? null),
        new Date(s.createdAt).toISOString(),
        s.note ?? '',
        s.round ?? '',
        ...caseCells,
      ]);
    }
    yield chunk;
    done++;
    if (opts.totalTexts) opts.onProgress?.(done / opts.totalTexts);
  }
  opts.onProgress?.(1);
}

function turnAt<T extends { start: number }>(turns: readonly T[], offset: number): T | undefined {
  let found: T | undefined;
  for (const t of turns) {
    if (t.start <= offset) found = t;
    else break;
  }
  return found;
}
