import { ImportError } from './import-error.js';

/**
 * A stretch of WebVTT cue text and the voice it is in: a name from `<v Name>`, null for `<v>` without
 * a name, undefined outside any voice span.
 */
export interface VoiceRun {
  voice: string | null | undefined;
  text: string;
}

const NAMED: Record<string, string> = {
  amp: '&', lt: '<', gt: '>', quot: '"', apos: "'", nbsp: '\u00a0', lrm: '\u200e', rlm: '\u200f',
  ndash: '–', mdash: '—', hellip: '…', lsquo: '‘', rsquo: '’', ldquo: '“', rdquo: '”', copy: '©', reg: '®',
};
const ENTITY = /^&(?:#(\d{1,7})|#[xX]([0-9a-fA-F]{1,6})|([A-Za-z][A-Za-z0-9]{1,31}));/;

/**
 * Reads cue text as the WebVTT cue text tokenizer does (W3C WebVTT §6.4, "cue text parsing"):
 * tags are dropped, `<v>` spans give speakers, end tags may be omitted (a voice runs to the end of the
 * cue), timestamp tags (`<00:17.500>`) and unknown tag names are ignored, character references decoded.
 * One departure, to lose no words: the tokenizer would silently swallow the text after a bare `<`
 * (`a < b`) into a tag, so a `<` that never closes, or that is followed by a space, is an error
 * asking for `&lt;`.
 *
 * `locate(offset)` maps an offset in `text` to a line and column in the file, for errors.
 */
export function readCueText(text: string, locate: (offset: number) => { line: number; column: number }): VoiceRun[] {
  const runs: VoiceRun[] = [];
  let buf = '';
  let voice: string | null | undefined = undefined;
  const flush = (): void => {
    if (buf !== '') runs.push({ voice, text: buf });
    buf = '';
  };
  const fail = (offset: number, message: string): ImportError =>
    new ImportError({ code: 'bad_cue_text', format: 'webvtt', ...locate(offset), message });

  let i = 0;
  while (i < text.length) {
    const c = text[i]!;
    if (c === '&') {
      const m = ENTITY.exec(text.slice(i, i + 40));
      const decoded = m ? decodeEntity(m) : null;
      if (m && decoded !== null) {
        buf += decoded;
        i += m[0].length;
      } else {
        buf += '&';
        i++;
      }
      continue;
    }
    if (c !== '<') {
      buf += c;
      i++;
      continue;
    }
    const close = text.indexOf('>', i);
    if (close < 0) throw fail(i, "'<' opens a tag that is never closed; write &lt; for a literal '<'");
    const inner = text.slice(i + 1, close);
    const isEnd = inner.startsWith('/');
    const body = isEnd ? inner.slice(1) : inner;
    if (body === '' ? !isEnd : /^[\s<]/.test(body) || body.includes('<')) {
      throw fail(i, `'<${inner}>' is not a tag; write &lt; for a literal '<'`);
    }
    const name = /^[^\s./]*/.exec(body)![0];
    if (name === 'v') {
      flush();
      if (isEnd) voice = undefined;
      else {
        const annotation = body.slice(/^[^\s]*/.exec(body)![0].length).trim().replace(/\s+/g, ' ');
        voice = annotation === '' ? null : decodeAll(annotation);
      }
    }
    // Every other tag (i, b, u, c, ruby, rt, lang, timestamps, unknown names) only styles text.
    i = close + 1;
  }
  flush();
  return runs;
}

function decodeEntity(m: RegExpExecArray): string | null {
  if (m[1] !== undefined || m[2] !== undefined) {
    const code = m[1] !== undefined ? Number(m[1]) : parseInt(m[2]!, 16);
    if (code === 0 || code > 0x10ffff || (code >= 0xd800 && code <= 0xdfff)) return '\ufffd';
    return String.fromCodePoint(code);
  }
  return NAMED[m[3]!] ?? null;
}

function decodeAll(s: string): string {
  return s.replace(/&(?:#\d{1,7}|#[xX][0-9a-fA-F]{1,6}|[A-Za-z][A-Za-z0-9]{1,31});/g, (e) => {
    const m = ENTITY.exec(e);
    return (m && decodeEntity(m)) ?? e;
  });
}
