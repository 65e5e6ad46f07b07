import { describe, expect, it } from 'vitest';
import { SPEC_INTERVIEW } from './spec-samples.js';
import { errorOf, refusalOf } from './test-support.js';
import { importWebVtt, parseVttTimestamp, parseWebVtt } from './webvtt.js';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);



describe('WebVTT: the specification’s interview sample (W3C WebVTT §1 / §1.1)', () => {
  it('one turn per cue with mergeCues off: 13 cues, voices from <v>, times from the timings, <i> stripped', () => {
    const { turns } = parseWebVtt(SPEC_INTERVIEW, { mergeCues: false });
    expect(turns).toHaveLength(13);
    expect(turns[0]).toEqual({ speaker: 'Roger Bingham', startMs: 11_000, endMs: 13_000, text: 'We are in New York City' });
    expect(turns[8]).toEqual({ speaker: 'Roger Bingham', startMs: 30_000, endMs: 31_500, text: 'When we e-mailed—' });
    expect(turns[9]).toEqual({
      speaker: 'Neil deGrasse Tyson',
      startMs: 30_500,
      endMs: 32_500,
      text: 'Didn’t we talk about enough in that conversation?',
    });
    expect(turns[11]).toEqual({ speaker: 'Neil deGrasse Tyson', startMs: 32_500, endMs: 33_500, text: 'Laughs' });
    expect(turns.map((t) => t.speaker).filter((s) => s === 'Roger Bingham')).toHaveLength(11);
  });

  it('merged (default): consecutive cues of one voice form one speaker turn, first start to last end', () => {
    const { turns } = parseWebVtt(SPEC_INTERVIEW);
    expect(turns.map((t) => [t.speaker, t.startMs, t.endMs])).toEqual([
      ['Roger Bingham', 11_000, 31_500],
      ['Neil deGrasse Tyson', 30_500, 32_500],
      ['Roger Bingham', 32_000, 35_500],
      ['Neil deGrasse Tyson', 32_500, 33_500],
      ['Roger Bingham', 35_500, 38_000],
    ]);
    expect(turns[0]!.text).toBe(
      'We are in New York City We’re actually at the Lucern Hotel, just down the street from the American Museum of ' +
        'Natural History And with me is Neil deGrasse Tyson Astrophysicist, Director of the Hayden Planetarium at the ' +
        'AMNH. Thank you for walking down here. And I want to do a follow-up on the last conversation we did. When we e-mailed—',
    );
    expect(turns[2]!.text).toBe("No! No no no no; 'cos 'cos obviously 'cos");
  });
});

// Source: MDN Web Docs, "Web Video Text Tracks Format (WebVTT)", the first example (dialogue dashes) and
// "Example 3 - Common WebVTT example with a header and cues" (text header, numeric cue identifiers,
// hh:mm:ss.ttt timings), as found with the search tool.
describe('WebVTT: MDN examples', () => {
  it('dialogue dashes split a cue into one turn per line, without speakers', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:04.000\n- Never drink liquid nitrogen.\n\n00:05.000 --> 00:09.000\n- It will perforate your stomach.\n- You could die.\n';
    expect(parseWebVtt(file).turns).toEqual([
      { speaker: null, startMs: 1000, endMs: 4000, text: 'Never drink liquid nitrogen.' },
      { speaker: null, startMs: 5000, endMs: 9000, text: 'It will perforate your stomach.' },
      { speaker: null, startMs: 5000, endMs: 9000, text: 'You could die.' },
    ]);
  });

  it('header text and cue identifiers are skipped; hours are read', () => {
    const file = [
      'WEBVTT - This file has cues.',
      '',
      '14',
      '00:01:14.815 --> 00:01:18.114',
      '- What?',
      '- Where are we now?',
      '',
      '15',
      '00:01:18.171 --> 00:01:20.991',
      '- This is big bat country.',
      '',
      '16',
      '00:01:21.058 --> 00:01:23.868',
      '- [ Bats Screeching ]',
      "- They won't get in your hair. They're after the bugs.",
      '',
    ].join('\n');
    const { turns } = parseWebVtt(file);
    expect(turns.map((t) => t.text)).toEqual([
      'What?',
      'Where are we now?',
      'This is big bat country.',
      '[ Bats Screeching ]',
      "They won't get in your hair. They're after the bugs.",
    ]);
    expect(turns.map((t) => [t.startMs, t.endMs])).toEqual([
      [74_815, 78_114],
      [74_815, 78_114],
      [78_171, 80_991],
      [81_058, 83_868],
      [81_058, 83_868],
    ]);
  });
});

describe('WebVTT: timestamps (W3C WebVTT §4.5 "WebVTT timestamp")', () => {
  it.each([
    ['00:11.000', 11_000],
    ['01:02.345', 62_345],
    ['1:00:00.000', 3_600_000],
    ['00:01:14.815', 74_815],
    ['100:00:00.001', 360_000_001],
  ])('%s is %i ms', (s, ms) => expect(parseVttTimestamp(s)).toBe(ms));

  it.each(['00:60.000', '60:00.000', '0:01.000', '00:01.00', '00:01,000', '00:01:60.000', 'ab:cd.efg'])('%s is not a timestamp', (s) =>
    expect(parseVttTimestamp(s)).toBeNull(),
  );
});

// Invented files from here on.
describe('WebVTT: own files, each form', () => {
  it('header lines, NOTE, STYLE and REGION blocks carry no transcript text', () => {
    const file = [
      'WEBVTT Focus group 2, invented',
      'Kind: captions',
      'Language: en',
      '',
      'STYLE',
      '::cue(v[voice="Ines"]) { color: teal }',
      '',
      'REGION',
      'id:left width:40%',
      '',
      'NOTE recorded at the invented Marlow Street library',
      'second note line',
      '',
      'intro',
      '00:00:01.000 --> 00:00:03.500 line:0 position:20% align:start',
      '<v Ines Varga>Shall we start?</v>',
      '',
      'NOTE between cues',
      '',
      '00:00:04.000 --> 00:00:06.000',
      '<v.loud.angry Tomas Reyes>Yes &amp; quickly &lt;please&gt;</v>',
    ].join('\n');
    expect(parseWebVtt(file).turns).toEqual([
      { speaker: 'Ines Varga', startMs: 1000, endMs: 3500, text: 'Shall we start?' },
      { speaker: 'Tomas Reyes', startMs: 4000, endMs: 6000, text: 'Yes & quickly <please>' },
    ]);
  });

  it('several voices in one cue, text outside a voice, karaoke timestamps and class spans', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:05.000\n<v Ines>Ready?</v> <v Tomas>Ready <00:03.000>now</v>\n<c.note>door bangs</c>\n';
    expect(parseWebVtt(file).turns).toEqual([
      { speaker: 'Ines', startMs: 1000, endMs: 5000, text: 'Ready?' },
      { speaker: 'Tomas', startMs: 1000, endMs: 5000, text: 'Ready now' },
      { speaker: null, startMs: 1000, endMs: 5000, text: 'door bangs' },
    ]);
  });

  it('an unclosed <v> or <i> runs to the end of the cue (end tags are optional, §4.2)', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:02.000\n<v Ines><i>so\nthen</v>\n\n00:02.000 --> 00:03.000\n<v Ines>we left\n';
    expect(parseWebVtt(file).turns).toEqual([{ speaker: 'Ines', startMs: 1000, endMs: 3000, text: 'so then we left' }]);
  });

  it('Name: labels in cues without voice tags (meeting-software style), merged per speaker', () => {
    const file = [
      'WEBVTT',
      '',
      '1',
      '00:00:00.500 --> 00:00:02.000',
      'Ines Varga: Welcome back.',
      '',
      '2',
      '00:00:02.000 --> 00:00:04.000',
      'Ines Varga: Where were we?',
      '',
      '3',
      '00:00:04.000 --> 00:00:07.250',
      'P07: The bus: it never came.',
    ].join('\n');
    expect(parseWebVtt(file).turns).toEqual([
      { speaker: 'Ines Varga', startMs: 500, endMs: 4000, text: 'Welcome back. Where were we?' },
      { speaker: 'P07', startMs: 4000, endMs: 7250, text: 'The bus: it never came.' },
    ]);
  });

  it('voice names in any script, with entities decoded', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:02.000\n<v Zoë Ñúñez &amp; co>hola\n\n00:02.000 --> 00:03.000\n<v 田中 さくら>はい\n';
    expect(parseWebVtt(file).turns.map((t) => [t.speaker, t.text])).toEqual([
      ['Zoë Ñúñez & co', 'hola'],
      ['田中 さくら', 'はい'],
    ]);
  });

  it('cues of no speaker are never merged; a cue may follow another without a blank line', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:02.000\nfirst\n00:02.000 --> 00:03.000\nsecond\n';
    expect(parseWebVtt(file).turns.map((t) => t.text)).toEqual(['first', 'second']);
  });

  it('BOM and CRLF line ends, equal start and end tolerated, empty cues dropped', async () => {
    const bytes = enc('\uFEFFWEBVTT\r\n\r\n00:01.000 --> 00:01.000\r\n<v Ana>hi\r\n\r\n00:02.000 --> 00:03.000\r\n\r\n');
    expect((await importWebVtt(bytes)).turns).toEqual([{ speaker: 'Ana', startMs: 1000, endMs: 1000, text: 'hi' }]);
  });

  it('numeric and named character references are decoded; unknown ones kept as written', () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:02.000\ncaf&#233; &#x2014; &nbsp;&lrm;x &bogus; AT&T\n';
    expect(parseWebVtt(file).turns[0]!.text).toBe('café — \u00a0\u200ex &bogus; AT&T');
  });
});

describe('WebVTT: broken files', () => {
  it('a missing signature is refused at line 1', () => {
    const e = errorOf(() => parseWebVtt('WEBVTX\n\n00:01.000 --> 00:02.000\nhi\n'));
    expect([e.code, e.line, e.format]).toEqual(['bad_header', 1, 'webvtt']);
    expect(e.message).toMatch(/^line 1: .*WEBVTT/);
  });

  it('"WEBVTTX" is not the signature either (it must be followed by a space, tab or line end)', () => {
    expect(errorOf(() => parseWebVtt('WEBVTTX\n')).code).toBe('bad_header');
  });

  it('an unreadable timing names its line and column', () => {
    const e = errorOf(() => parseWebVtt('WEBVTT\n\n1\n00:01.000 --> 00:02,500\nhi\n'));
    expect([e.code, e.line, e.column]).toEqual(['bad_timing', 4, 15]);
    expect(e.message).toContain("'00:02,500' is not a timestamp");
  });

  it('a cue that ends before it starts is refused with its line', () => {
    const file = ['WEBVTT', '', '00:00.000 --> 00:00.800', 'ok', '', '00:01.000 --> 00:00.500', 'backwards'].join('\n');
    const e = errorOf(() => parseWebVtt(file));
    expect([e.code, e.line]).toEqual(['timing_order', 6]);
    expect(e.message).toBe("line 6: cue timing '00:01.000 --> 00:00.500' ends before it starts (0:00:00.500 < 0:00:01.000)");
  });

  it('a text block with no timing line is refused instead of dropped', () => {
    const e = errorOf(() => parseWebVtt('WEBVTT\n\n00:01.000 --> 00:02.000\nhi\n\nlost words\nmore\n'));
    expect([e.code, e.line]).toEqual(['missing_timing', 6]);
  });

  it("a bare '<' that never closes would swallow words: refused with line and column", () => {
    const e = errorOf(() => parseWebVtt('WEBVTT\n\n00:01.000 --> 00:02.000\nfine\nwhen x < 3 we stop\n'));
    expect([e.code, e.line, e.column]).toEqual(['bad_cue_text', 5, 8]);
  });

  it("'< b >' is not a tag: refused rather than read as one", () => {
    expect(errorOf(() => parseWebVtt('WEBVTT\n\n00:01.000 --> 00:02.000\na < b > c\n')).code).toBe('bad_cue_text');
  });

  it('a file with only a header holds no transcript', () => {
    expect(errorOf(() => parseWebVtt('WEBVTT\n\nNOTE nothing here\n')).code).toBe('empty');
  });

  it('bytes that are not UTF-8 are refused with their place', async () => {
    const bytes = new Uint8Array([...enc('WEBVTT\n\n00:01.000 --> 00:02.000\ncaf'), 0xe9, ...enc('\n')]);
    const e = await refusalOf(importWebVtt(bytes));
    expect([e.code, e.line, e.column]).toEqual(['bad_encoding', 4, 4]);
  });
});
