import { ImportError, type ImportFormat } from './import-error.js';

/**
 * Bytes to text with line ends normalised to LF and any byte order mark removed.
 * UTF-8 is decoded strictly: a file saved in another encoding is refused with the line and column of
 * the first bad byte instead of being silently filled with replacement characters.
 * A UTF-16 byte order mark selects UTF-16 (word processors save "Unicode text" that way).
 */
export function decodeText(bytes: Uint8Array, format: ImportFormat, encoding = 'utf-8'): string {
  let text: string;
  if (bytes[0] === 0xff && bytes[1] === 0xfe) text = new TextDecoder('utf-16le').decode(bytes.subarray(2));
  else if (bytes[0] === 0xfe && bytes[1] === 0xff) text = new TextDecoder('utf-16be').decode(bytes.subarray(2));
  else if (isUtf8(encoding)) {
    const bad = firstInvalidUtf8(bytes);
    if (bad >= 0) {
      const { line, column } = locateByte(bytes, bad);
      throw new ImportError({
        code: 'bad_encoding',
        format,
        line,
        column,
        message: `byte 0x${bytes[bad]!.toString(16).padStart(2, '0')} is not valid UTF-8; save the file as UTF-8 or choose its encoding`,
      });
    }
    text = new TextDecoder('utf-8', { ignoreBOM: false }).decode(bytes);
  } else {
    let decoder: TextDecoder;
    try {
      decoder = new TextDecoder(encoding);
    } catch (cause) {
      throw new ImportError({ code: 'bad_encoding', format, message: `unknown text encoding '${encoding}'`, cause });
    }
    text = decoder.decode(bytes);
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const nul = text.indexOf('\0');
  if (nul >= 0) {
    const { line, column } = locateChar(text, nul);
    throw new ImportError({ code: 'bad_encoding', format, line, column, message: 'contains a NUL character: this looks like a binary file, not text' });
  }
  return text.replace(/\r\n?/g, '\n');
}

function isUtf8(label: string): boolean {
  return /^(utf-?8|unicode-1-1-utf-8)$/i.test(label.trim());
}

/** Index of the first byte that does not start or continue a well-formed UTF-8 sequence, or -1. */
export function firstInvalidUtf8(b: Uint8Array): number {
  let i = 0;
  const n = b.length;
  while (i < n) {
    const c = b[i]!;
    if (c < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let min: number;
    let max = 0xbf;
    if (c >= 0xc2 && c <= 0xdf) (need = 1), (min = 0x80);
    else if (c === 0xe0) (need = 2), (min = 0xa0);
    else if (c >= 0xe1 && c <= 0xef) (need = 2), (min = 0x80), (max = c === 0xed ? 0x9f : 0xbf);
    else if (c === 0xf0) (need = 3), (min = 0x90);
    else if (c >= 0xf1 && c <= 0xf3) (need = 3), (min = 0x80);
    else if (c === 0xf4) (need = 3), (min = 0x80), (max = 0x8f);
    else return i;
    // The second byte has the tightened range (overlongs, surrogates, > U+10FFFF); the rest 80..BF.
    for (let k = 1; k <= need; k++) {
      const d = b[i + k];
      const lo = k === 1 ? min : 0x80;
      const hi = k === 1 ? max : 0xbf;
      if (d === undefined || d < lo || d > hi) return i;
    }
    i += need + 1;
  }
  return -1;
}

function locateByte(bytes: Uint8Array, index: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < index; i++) {
    if (bytes[i] === 0x0a || (bytes[i] === 0x0d && bytes[i + 1] !== 0x0a)) (line++, (lineStart = i + 1));
  }
  // Column in characters: count the UTF-8 lead bytes before the bad one on its line.
  let column = 1;
  for (let i = lineStart; i < index; i++) if ((bytes[i]! & 0xc0) !== 0x80) column++;
  return { line, column };
}

export function locateChar(text: string, index: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < index; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) (line++, (lineStart = i + 1));
  }
  return { line, column: index - lineStart + 1 };
}
