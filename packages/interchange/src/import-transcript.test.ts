import { readFileSync } from 'node:fs';
import { zipSync, strToU8 } from 'fflate';
import { describe, expect, it } from 'vitest';
import { refusalOf } from './test-support.js';
import { detectFormat, importTranscript, sniff } from './import-transcript.js';

const fixture = (name: string): Uint8Array => new Uint8Array(readFileSync(new URL(`./fixtures/${name}`, import.meta.url)));
const enc = (s: string): Uint8Array => new TextEncoder().encode(s);


// Invented fixtures; media types as registered with IANA: text/vtt (W3C WebVTT), text/plain (RFC 2046),
// application/vnd.openxmlformats-officedocument.wordprocessingml.document (ECMA-376); SRT has no
// registered type, application/x-subrip is common practice.
describe('importTranscript: choosing the importer', () => {
  it('WebVTT by extension, titled after the file name', async () => {
    const t = await importTranscript({ filename: 'uploads/harbour-interview.vtt', bytes: fixture('harbour-interview.vtt') });
    expect(t).toEqual({
      title: 'harbour-interview',
      turns: [
        { speaker: 'Interviewer', startMs: 2000, endMs: 5500, text: 'What was the first job you had on the docks?' },
        { speaker: 'Tobias Lund', startMs: 6000, endMs: 12_250, text: 'Rope splicing. My uncle taught me. He had hands like leather.' },
      ],
    });
  });

  it('SRT by extension, with a title given in the options', async () => {
    const t = await importTranscript({ filename: 'ferry-interview.SRT', bytes: fixture('ferry-interview.srt') }, { title: 'Ferry, 1961' });
    expect(t.title).toBe('Ferry, 1961');
    expect(t.turns.map((x) => [x.speaker, x.text])).toEqual([
      ['INTERVIEWER', 'Where did the ferry go?'],
      ['GRETE', 'Across to the island, twice a day.'],
    ]);
  });

  it('plain text by extension', async () => {
    const t = await importTranscript({ filename: 'allotment-interview.txt', bytes: fixture('allotment-interview.txt') });
    expect(t.turns[1]).toMatchObject({ speaker: 'I', startMs: 4000 });
  });

  it('by media type when the name has no known extension', async () => {
    const bytes = fixture('harbour-interview.vtt');
    expect(detectFormat({ filename: 'upload', bytes, mediaType: 'text/vtt; charset=utf-8' })).toBe('webvtt');
    expect(detectFormat({ filename: 'upload.bin', bytes: enc('x'), mediaType: 'application/x-subrip' })).toBe('srt');
    expect(detectFormat({ filename: 'blob', bytes: enc('x'), mediaType: 'application/vnd.openxmlformats-officedocument.wordprocessingml.document' })).toBe('docx');
  });

  it('by sniffing the content when neither name nor type says', async () => {
    expect(sniff(fixture('harbour-interview.vtt'))).toBe('webvtt');
    expect(sniff(fixture('ferry-interview.srt'))).toBe('srt');
    expect(sniff(fixture('allotment-interview.txt'))).toBe('text');
    expect(sniff(zipSync({ 'a.txt': strToU8('a') }))).toBe('docx');
    expect(sniff(new Uint8Array([0x00, 0x01, 0x02, 0x03]))).toBe('unknown');
    // UTF-16LE with its byte order mark: "I: hi"
    expect(sniff(new Uint8Array([0xff, 0xfe, 0x49, 0, 0x3a, 0, 0x20, 0, 0x68, 0, 0x69, 0]))).toBe('text');
    const t = await importTranscript({ filename: 'paste', bytes: fixture('ferry-interview.srt') });
    expect(t.turns).toHaveLength(2);
  });

  it('the extension wins over the content, so a mislabelled file gets the named format’s error', async () => {
    const e = await refusalOf(importTranscript({ filename: 'notes.vtt', bytes: enc('I: hello') }));
    expect([e.code, e.line]).toEqual(['bad_header', 1]);
  });
});

describe('importTranscript: refusals', () => {
  it.each(['interview.doc', 'interview.pdf', 'interview.rtf', 'interview.odt'])('%s: unsupported, saying what to do', async (filename) => {
    const e = await refusalOf(importTranscript({ filename, bytes: enc('whatever') }));
    expect(e.code).toBe('unsupported_format');
    expect(e.message).toMatch(/save|export/);
  });

  it('binary content of unknown kind', async () => {
    const e = await refusalOf(importTranscript({ filename: 'x.bin', bytes: new Uint8Array([0, 1, 2, 3, 4]) }));
    expect(e.code).toBe('unsupported_format');
    expect(e.message).toContain('.vtt');
  });

  it('files over the size limit, before reading them', async () => {
    const e = await refusalOf(importTranscript({ filename: 'big.txt', bytes: new Uint8Array(2048).fill(0x61) }, { maxBytes: 1024 }));
    expect([e.code, e.line]).toEqual(['too_large', null]);
    expect(e.message).toBe('the file is 2.0 KiB, over the limit of 1.0 KiB');
    expect(JSON.parse(JSON.stringify(e))).toEqual({ code: 'too_large', message: e.message, format: 'text', line: null, column: null });
  });

  it('never returns a partial transcript: a late error fails the whole import', async () => {
    const good = Array.from({ length: 200 }, (_, i) => `${i + 1}\n00:00:${String(i % 60).padStart(2, '0')},000 --> 00:00:${String(i % 60).padStart(2, '0')},500\nline ${i}\n`).join('\n');
    const e = await refusalOf(importTranscript({ filename: 'long.srt', bytes: enc(`${good}\n201\n00:00:09,000 --> 00:00:08,000\nlast\n`) }));
    expect([e.code, e.line]).toEqual(['timing_order', 802]);
  });
});
