import { describe, expect, it } from 'vitest';
import { errorOf, refusalOf } from './test-support.js';
import { importSrt, parseSrt } from './srt.js';


// The SubRip layout (cue number; 'hh:mm:ss,mmm --> hh:mm:ss,mmm'; text lines; blank line) has no
// formal standard: common practice, as described for example by the Library of Congress format
// description "SubRip Subtitle format (SRT)" (from memory). All files below are invented.
describe('SRT: cues', () => {
  it('numbered cues with comma decimals, multi-line text joined, tags stripped', () => {
    const file = [
      '1',
      '00:00:01,600 --> 00:00:04,200',
      'We moved to the estate',
      'in <i>ninety-eight</i>.',
      '',
      '2',
      '00:00:05,900 --> 00:01:02,050',
      '<font color="#ffff00">{\\an8}The lift</font> was <b>always</b> broken.',
      '',
    ].join('\n');
    expect(parseSrt(file).turns).toEqual([
      { speaker: null, startMs: 1600, endMs: 4200, text: 'We moved to the estate in ninety-eight.' },
      { speaker: null, startMs: 5900, endMs: 62_050, text: 'The lift was always broken.' },
    ]);
  });

  it('hours beyond 1 and 3-digit milliseconds are read exactly', () => {
    const file = '7\n01:02:03,004 --> 10:00:00,999\nlate\n';
    expect(parseSrt(file).turns[0]).toMatchObject({ startMs: 3_723_004, endMs: 36_000_999 });
  });

  it('dialogue dashes give one turn per speaker line; NAME: labels give speakers', () => {
    const file = [
      '1',
      '00:00:01,000 --> 00:00:03,000',
      '- Did you stay?',
      '- MARISOL: We had no choice.',
      '',
      '2',
      '00:00:03,000 --> 00:00:05,000',
      'MARISOL: None at all.',
      '',
      '3',
      '00:00:05,000 --> 00:00:06,000',
      'KOFI: Nobody did.',
    ].join('\n');
    expect(parseSrt(file).turns).toEqual([
      { speaker: null, startMs: 1000, endMs: 3000, text: 'Did you stay?' },
      { speaker: 'MARISOL', startMs: 1000, endMs: 5000, text: 'We had no choice. None at all.' },
      { speaker: 'KOFI', startMs: 5000, endMs: 6000, text: 'Nobody did.' },
    ]);
  });

  it("a dash before a number is not a dialogue dash; '-Word' without a space is", () => {
    const file = '1\n00:00:01,000 --> 00:00:02,000\nit was\n-5 degrees\n-Really?\n';
    expect(parseSrt(file).turns.map((t) => t.text)).toEqual(['it was -5 degrees', 'Really?']);
  });

  it('mergeCues: false keeps one turn per cue', () => {
    const file = '1\n00:00:01,000 --> 00:00:02,000\nKOFI: one\n\n2\n00:00:02,000 --> 00:00:03,000\nKOFI: two\n';
    expect(parseSrt(file, { mergeCues: false }).turns.map((t) => t.text)).toEqual(['one', 'two']);
  });

  it('a colon inside a sentence is not a speaker', () => {
    const file = '1\n00:00:01,000 --> 00:00:02,000\nthe rule was simple: be home by nine\n';
    expect(parseSrt(file).turns[0]).toMatchObject({ speaker: null, text: 'the rule was simple: be home by nine' });
  });

  it('tolerates BOM, CRLF, a missing blank line before the next cue, and missing cue numbers', async () => {
    const bytes = new TextEncoder().encode(
      '\uFEFF1\r\n00:00:01,000 --> 00:00:02,000\r\nfirst\r\n2\r\n00:00:02,000 --> 00:00:03,000\r\nsecond\r\n\r\n00:00:04.000 --> 00:00:05.000 X1:10 X2:20 Y1:5 Y2:9\r\nthird\r\n',
    );
    expect((await importSrt(bytes)).turns.map((t) => [t.text, t.startMs])).toEqual([
      ['first', 1000],
      ['second', 2000],
      ['third', 4000],
    ]);
  });

  it('Windows-1252 files import when their encoding is given', async () => {
    const bytes = new Uint8Array([...new TextEncoder().encode('1\n00:00:01,000 --> 00:00:02,000\ncaf'), 0xe9, 0x0a]);
    expect((await importSrt(bytes, { encoding: 'windows-1252' })).turns[0]!.text).toBe('café');
    const e = await refusalOf(importSrt(bytes));
    expect([e.code, e.line, e.column]).toEqual(['bad_encoding', 3, 4]);
  });
});

describe('SRT: broken files', () => {
  it('an unreadable timing names its line', () => {
    const e = errorOf(() => parseSrt('1\n00:00:01,000 --> 00:00:02,000\nok\n\n2\n00:00:0x,000 --> 00:00:03,000\nbad\n'));
    expect([e.code, e.line, e.format]).toEqual(['bad_timing', 6, 'srt']);
  });

  it('seconds of 60 are refused', () => {
    expect(errorOf(() => parseSrt('1\n00:00:60,000 --> 00:01:03,000\nbad\n')).code).toBe('bad_timing');
  });

  it('a cue that ends before it starts is refused with its line', () => {
    const e = errorOf(() => parseSrt('1\n00:00:05,000 --> 00:00:04,999\nbackwards\n'));
    expect([e.code, e.line]).toEqual(['timing_order', 2]);
    expect(e.message).toMatch(/^line 2: cue timing '00:00:05,000 --> 00:00:04,999' ends before it starts/);
  });

  it('a cue number without a timing line is refused', () => {
    const e = errorOf(() => parseSrt('1\n00:00:01,000 --> 00:00:02,000\nok\n\n2\nno timing here\n'));
    expect([e.code, e.line]).toEqual(['missing_timing', 6]);
  });

  it('text that is not a cue at all is refused at its first line', () => {
    const e = errorOf(() => parseSrt('Dear diary,\ntoday I...\n'));
    expect([e.code, e.line]).toEqual(['missing_timing', 1]);
  });

  it('an empty file holds no transcript', () => {
    expect(errorOf(() => parseSrt('\n\n')).code).toBe('empty');
  });
});
