import { describe, expect, it } from 'vitest';
import { decodeText, firstInvalidUtf8 } from './decode-text.js';
import { ImportError } from './import-error.js';

// Reference: the WHATWG Encoding Standard's UTF-8 decoder, as implemented by Node's TextDecoder with
// `fatal: true`, which throws exactly when the bytes are not well-formed UTF-8 (Unicode 15 §3.9, Table 3-7).
const strictDecodes = (b: Uint8Array): boolean => {
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(b);
    return true;
  } catch {
    return false;
  }
};

describe('UTF-8 validation agrees with the WHATWG decoder', () => {
  it('on well-formed text in several scripts', () => {
    const b = new TextEncoder().encode('Grüße, Ωμέγα, 日本語, 🌱 and 𝄞');
    expect(firstInvalidUtf8(b)).toBe(-1);
  });

  it.each([
    [[0xc0, 0x80], 0], // overlong NUL
    [[0xe0, 0x80, 0x80], 0], // overlong
    [[0xed, 0xa0, 0x80], 0], // surrogate
    [[0xf4, 0x90, 0x80, 0x80], 0], // above U+10FFFF
    [[0x61, 0xe2, 0x82], 1], // truncated
    [[0x61, 0x80], 1], // stray continuation byte
  ])('%j fails at %i', (bytes, at) => {
    const b = new Uint8Array(bytes);
    expect(strictDecodes(b)).toBe(false);
    expect(firstInvalidUtf8(b)).toBe(at);
  });

  it('on 20,000 random byte strings biased towards multi-byte sequences', () => {
    let seed = 12345;
    const rand = (): number => ((seed = (seed * 1103515245 + 12345) >>> 0) >>> 8) / 0x1000000;
    const pool = [0x41, 0x80, 0x9f, 0xa0, 0xbf, 0xc2, 0xdf, 0xe0, 0xe1, 0xed, 0xef, 0xf0, 0xf4, 0xf5, 0xff];
    for (let n = 0; n < 20_000; n++) {
      const b = Uint8Array.from({ length: 1 + Math.floor(rand() * 6) }, () => pool[Math.floor(rand() * pool.length)]!);
      expect(firstInvalidUtf8(b) === -1).toBe(strictDecodes(b));
    }
  });
});

describe('decodeText', () => {
  it('strips the BOM and normalises CRLF and lone CR', () => {
    expect(decodeText(new Uint8Array([0xef, 0xbb, 0xbf, 0x61, 0x0d, 0x0a, 0x62, 0x0d, 0x63]), 'text')).toBe('a\nb\nc');
  });

  it('locates a bad byte by line and character column (CRLF counted as one line end)', () => {
    const b = new Uint8Array([...new TextEncoder().encode('one\r\ntwö '), 0xff]);
    const e = (() => {
      try {
        decodeText(b, 'srt');
      } catch (err) {
        return err as ImportError;
      }
      throw new Error('expected an error');
    })();
    expect([e.code, e.format, e.line, e.column]).toEqual(['bad_encoding', 'srt', 2, 5]);
    expect(e.message).toMatch(/^line 2, column 5: byte 0xff is not valid UTF-8/);
  });

  it('names an unknown encoding label', () => {
    expect(() => decodeText(new Uint8Array([0x61]), 'text', 'klingon-8')).toThrow(/unknown text encoding 'klingon-8'/);
  });
});
