import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { errorOf, refusalOf } from './test-support.js';
import { importPlainText, parsePlainText } from './plain-text.js';
import { isCodeLabel, looksLikeName, matchLabelCandidate } from './speaker-label.js';


// Transcript conventions checked here (speaker prefixes such as I:/P03:, bracketed timestamps at the
// start of a turn, blank lines between paragraphs) are common practice in research transcription;
// no single published standard defines them. All texts are invented.
describe('plain text: an invented interview (fixtures/allotment-interview.txt)', () => {
  it('reads every turn, speaker and timestamp form', async () => {
    const bytes = readFileSync(new URL('./fixtures/allotment-interview.txt', import.meta.url));
    const { turns } = await importPlainText(bytes);
    expect(turns).toEqual([
      {
        speaker: null,
        startMs: null,
        endMs: null,
        text: 'Allotment study, interview 6 (invented)\nRecorded at the invented Fernside allotments, spring.',
      },
      { speaker: 'I', startMs: 4000, endMs: null, text: 'Thanks for meeting me here. How long have you had the plot?' },
      {
        speaker: 'P06',
        startMs: 9000,
        endMs: null,
        text:
          'Eleven years. My neighbour, Mrs Adeyemi, gave me the first seeds.\n' +
          "She said one thing I still remember: never plant what you won't eat.\n\nAnd I mostly haven't.",
      },
      { speaker: 'I', startMs: 72_000, endMs: null, text: 'Do you share the harvest?' },
      { speaker: 'P06', startMs: 75_500, endMs: null, text: 'With the whole row. Note: not the courgettes, nobody wants those.' },
      { speaker: 'Dr Okafor', startMs: null, endMs: null, text: 'Can I add something here?' },
      { speaker: 'P06', startMs: 123_000, endMs: null, text: 'Of course.' },
    ]);
  });
});

describe('plain text: timestamp forms at the start of a turn', () => {
  it.each([
    ['[1:02:03] I: a', 3_723_000],
    ['[02:03] I: a', 123_000],
    ['(02:03) I: a', 123_000],
    ['[01:02:03.250] I: a', 3_723_250],
    ['[01:02:03,5] I: a', 3_723_500],
    ['I: [1:02:03] a', 3_723_000],
    ['I (02:03): a', 123_000],
    ['[02:03] a', 123_000],
    ['01:02:03 I: a', 3_723_000],
    ['0:02:03.5 a', 123_500],
  ])('%s starts at %i ms', (line, ms) => {
    const [turn] = parsePlainText(line).turns;
    expect(turn).toMatchObject({ startMs: ms, text: 'a' });
  });

  it('a timestamp alone on a line gives its time to the next turn', () => {
    expect(parsePlainText('I: q\n[00:10]\nP1: a').turns[1]).toEqual({ speaker: 'P1', startMs: 10_000, endMs: null, text: 'a' });
  });

  it('a timestamp with minutes of 60 or more is refused at its line and column', () => {
    const e = errorOf(() => parsePlainText('I: fine\n\nP2:  [00:75] no'));
    expect([e.code, e.line, e.column, e.format]).toEqual(['bad_timestamp', 3, 6, 'text']);
    expect(e.message).toBe("line 3, column 6: timestamp '[00:75]' has minutes or seconds of 60 or more");
  });

  it('a speaker-and-time line heads the turn whose words follow (transcription-service exports)', () => {
    const text = 'Dana Whitfield  0:03\nSo we started early.\nVery early.\n\nTomas Reyes  1:02:15\nRight.\n\nDana Whitfield [2:10]\nYes.';
    expect(parsePlainText(text).turns).toEqual([
      { speaker: 'Dana Whitfield', startMs: 3000, endMs: null, text: 'So we started early.\nVery early.' },
      { speaker: 'Tomas Reyes', startMs: 3_735_000, endMs: null, text: 'Right.' },
      { speaker: 'Dana Whitfield', startMs: 130_000, endMs: null, text: 'Yes.' },
    ]);
  });

  it('a line of a time of day or a heading word and a time is not a speaker heading', () => {
    for (const line of ['Chapter 3 10:30', 'Total 4:05', 'we met 10:30', 'Meeting at 10:30']) {
      expect(parsePlainText(line).turns).toEqual([{ speaker: null, startMs: null, endMs: null, text: line }]);
    }
  });

  it('a time of day with two fields opening a sentence is text, not a timestamp', () => {
    expect(parsePlainText('10:30 was when the bus came').turns[0]).toMatchObject({ startMs: null, text: '10:30 was when the bus came' });
  });

  it('a timestamp later in a line is part of the text', () => {
    expect(parsePlainText('I: we met at [10:30] sharp').turns[0]!.text).toBe('we met at [10:30] sharp');
  });
});

describe('plain text: speaker prefixes', () => {
  it.each(['I', 'R', 'P03', 'R12', 'INT', 'Interviewer', 'Interviewer 2', 'Participant B'])('%s is a code or role label', (l) =>
    expect(isCodeLabel(l)).toBe(true),
  );

  it.each([
    ['I: hello', 'I'],
    ['P03: hello', 'P03'],
    ['Dana: hello', 'Dana'],
    ['Dr Okafor: hello', 'Dr Okafor'],
    ['Dr. Okafor: hello', 'Dr. Okafor'],
    ['Ana de Souza: hello', 'Ana de Souza'],
    ["Siobhán O'Neill: hello", "Siobhán O'Neill"],
    ['MARISOL: hello', 'MARISOL'],
    ['Ольга: hello', 'Ольга'],
    ['田中：hello', '田中'],
    ['سارة: hello', 'سارة'],
    ['interviewer: hello', 'interviewer'],
    ['participant 3: hello', 'participant 3'],
  ])('%s has speaker %s', (line, speaker) => {
    expect(parsePlainText(line).turns[0]).toMatchObject({ speaker, text: 'hello' });
  });

  it('a label alone on its line takes the text of the following lines', () => {
    expect(parsePlainText('Interviewer:\nWhere were you born?\nAnd when?').turns[0]).toEqual({
      speaker: 'Interviewer',
      startMs: null,
      endMs: null,
      text: 'Where were you born?\nAnd when?',
    });
  });

  it.each([
    'The reason is simple: we had no bus.',
    'Note: the recorder stopped here.',
    'Anyway: we left.',
    'So: what now?',
    'Date: 4 May',
    'What I said was this: no.',
    'He told me, quite plainly: go home.',
    'we arrived at 10:30 and left',
    'See https://example.org: a link',
    'My grandmother Rosa Lindqvist Berg Amundsen: four names',
    '我们那时候都觉得生活很难：没有工作',
  ])('"%s" is an ordinary sentence, not a turn with a speaker', (line) => {
    expect(parsePlainText(line).turns).toEqual([{ speaker: null, startMs: null, endMs: null, text: line }]);
  });

  it('candidates are short: no more than three words and no sentence punctuation', () => {
    expect(matchLabelCandidate('One Two Three Four: x')).toBeNull();
    expect(matchLabelCandidate('Well, Dana: x')).toBeNull();
    expect(matchLabelCandidate('Dana:x')).toBeNull();
    expect(looksLikeName('The Plan')).toBe(false);
    expect(looksLikeName('Kofi Mensah')).toBe(true);
  });
});

describe('plain text: lines, paragraphs and encodings', () => {
  it('without speakers, each paragraph is its own turn and lines within it stay together', () => {
    const { turns } = parsePlainText('Field note, market day.\nCold morning.\n\n\nStalls opened late.\n');
    expect(turns.map((t) => t.text)).toEqual(['Field note, market day.\nCold morning.', 'Stalls opened late.']);
  });

  it('strips a UTF-8 BOM and normalises CRLF and CR line ends', async () => {
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...new TextEncoder().encode('I: one\r\ntwo\rP1: three\r\n')]);
    expect((await importPlainText(bytes)).turns).toEqual([
      { speaker: 'I', startMs: null, endMs: null, text: 'one\ntwo' },
      { speaker: 'P1', startMs: null, endMs: null, text: 'three' },
    ]);
  });

  it('reads UTF-16 text with a byte order mark (as word processors save "Unicode text")', async () => {
    const s = 'I: grüß dich\n';
    const le = new Uint8Array(2 + s.length * 2);
    le.set([0xff, 0xfe]);
    for (let i = 0; i < s.length; i++) (le[2 + i * 2] = s.charCodeAt(i) & 0xff), (le[3 + i * 2] = s.charCodeAt(i) >> 8);
    expect((await importPlainText(le)).turns[0]).toMatchObject({ speaker: 'I', text: 'grüß dich' });
  });

  it('refuses non-UTF-8 bytes with line and column, and binary files', async () => {
    const bad = new Uint8Array([...new TextEncoder().encode('I: ok\nP1: na'), 0xef, 0x76, 0x65]);
    const e = await refusalOf(importPlainText(bad));
    expect([e.code, e.line, e.column]).toEqual(['bad_encoding', 2, 7]);
    const bin = await refusalOf(importPlainText(new Uint8Array([0x49, 0x3a, 0x00, 0x01])));
    expect(bin.code).toBe('bad_encoding');
  });

  it('an empty or blank file holds no transcript', () => {
    expect(errorOf(() => parsePlainText(' \n\n\t\n')).code).toBe('empty');
  });

  it('reports rising progress ending at 1', () => {
    const seen: number[] = [];
    const text = Array.from({ length: 5000 }, (_, i) => `P${i % 3}: line ${i}`).join('\n');
    parsePlainText(text, { onProgress: (f) => seen.push(f) });
    expect(seen.length).toBeGreaterThan(10);
    expect(seen.length).toBeLessThanOrEqual(101);
    expect(seen.at(-1)).toBe(1);
    expect(seen.every((f, i) => i === 0 || f > seen[i - 1]!)).toBe(true);
  });
});
