import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import SrtParser from 'srt-parser-2';
import { describe, expect, it } from 'vitest';
import type { TreeNode } from 'webvtt-parser';
import { SPEC_INTERVIEW } from './spec-samples.js';
import { parseSrt } from './srt.js';
import { errorOf } from './test-support.js';
import { parseWebVtt } from './webvtt.js';

// Reference implementations from npm, run here side by side with ours:
// - webvtt-parser 2.2.0: the WebVTT parser and validator written against the W3C specification's
//   parsing algorithm (the one behind the W3C/WHATWG live validator, from memory);
// - srt-parser-2 1.2.3: a widely used SRT parser.
const require = createRequire(import.meta.url);
const { WebVTTParser } = require('webvtt-parser') as typeof import('webvtt-parser');

type Piece = [speaker: string | null, text: string, startMs: number, endMs: number];
const norm = (s: string): string => s.replace(/\s+/g, ' ').trim();

/** The reference's cues as (voice, text, start, end): one piece per <v> span, text outside voices apart. */
function referenceVtt(file: string): Piece[] {
  const { cues, errors } = new WebVTTParser().parse(file, 'metadata');
  expect(errors).toEqual([]);
  const out: Piece[] = [];
  const flatten = (nodes: readonly TreeNode[]): string =>
    nodes.map((n) => (n.type === 'text' ? n.value : n.type === 'object' ? flatten(n.children as TreeNode[]) : '')).join('');
  for (const cue of cues) {
    const [s, e] = [Math.round(cue.startTime * 1000), Math.round(cue.endTime * 1000)];
    let loose = '';
    const flush = (): void => {
      if (norm(loose) !== '') out.push([null, norm(loose), s, e]);
      loose = '';
    };
    for (const node of cue.tree.children) {
      if (node.type === 'object' && node.name === 'v') {
        flush();
        const text = norm(flatten(node.children as TreeNode[]));
        if (text !== '') out.push([node.value === '' ? null : node.value, text, s, e]);
      } else if (node.type === 'text') loose += node.value;
      else if (node.type === 'object') loose += flatten(node.children as TreeNode[]);
    }
    flush();
  }
  return out;
}

function oursVtt(file: string): Piece[] {
  return parseWebVtt(file, { mergeCues: false }).turns.map((t) => [t.speaker, t.text, t.startMs!, t.endMs!]);
}

function prng(seed: number): () => number {
  return () => ((seed = (seed * 1103515245 + 12345) >>> 0) >>> 8) / 0x1000000;
}

const WORDS = 'the tide came in early and we carried nets up past the chapel before dawn most days unless it rained'.split(' ');
const VOICES = ['Ines Varga', 'Tomas Reyes', 'P04', 'Interviewer'];

function stamp(ms: number, sep: string, hours: boolean): string {
  const h = Math.floor(ms / 3_600_000);
  const m = Math.floor(ms / 60_000) % 60;
  const s = Math.floor(ms / 1000) % 60;
  const p2 = (n: number): string => String(n).padStart(2, '0');
  return `${hours || h > 0 ? `${p2(h)}:` : ''}${p2(m)}:${p2(s)}${sep}${String(ms % 1000).padStart(3, '0')}`;
}

/** An invented WebVTT file with voices, classes, styling tags, karaoke timestamps, ids and settings. */
function generatedVtt(cues: number, seed: number): string {
  const r = prng(seed);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(r() * xs.length)]!;
  const words = (n: number): string => Array.from({ length: n }, () => pick(WORDS)).join(' ');
  let t = 0;
  const blocks = ['WEBVTT generated', 'NOTE invented content'];
  for (let i = 0; i < cues; i++) {
    const start = (t += Math.floor(r() * 4000));
    const end = start + 1 + Math.floor(r() * 5000);
    const id = r() < 0.3 ? `cue-${i}\n` : '';
    const settings = r() < 0.3 ? ' align:start position:10%' : '';
    const body = (): string => {
      const k = Math.floor(r() * 4);
      if (k === 0) return `<i>${words(3)}</i> ${words(2)}`;
      if (k === 1) return `${words(2)} <00:00:00.500>${words(2)}\n${words(3)}`;
      if (k === 2) return `<c.quiet>${words(4)}</c>`;
      return words(5);
    };
    const v = r();
    const text =
      v < 0.5 ? `<v ${pick(VOICES)}>${body()}` : v < 0.7 ? `<v.loud ${pick(VOICES)}>${body()}</v> ${body()}` : body();
    blocks.push(`${id}${stamp(start, '.', r() < 0.5)} --> ${stamp(end, '.', r() < 0.5)}${settings}\n${text}`);
  }
  return blocks.join('\n\n') + '\n';
}

describe('WebVTT: same cues, voices, texts and times as the reference parser (webvtt-parser 2.2.0)', () => {
  it('on the W3C specification’s interview sample (§1 of the 2017 Working Draft)', () => {
    expect(oursVtt(SPEC_INTERVIEW)).toEqual(referenceVtt(SPEC_INTERVIEW));
  });

  it('on fixtures/harbour-interview.vtt', () => {
    const file = readFileSync(new URL('./fixtures/harbour-interview.vtt', import.meta.url), 'utf8');
    expect(oursVtt(file)).toEqual(referenceVtt(file));
  });

  it.each([1, 2, 3])('on a generated file of 400 cues (seed %i)', (seed) => {
    const file = generatedVtt(400, seed);
    const ours = oursVtt(file);
    expect(ours.length).toBeGreaterThan(400);
    expect(ours).toEqual(referenceVtt(file));
  });
});

describe('WebVTT: files we refuse, the reference validator also flags on the same line', () => {
  const firstErrorLine = (file: string): number | undefined => new WebVTTParser().parse(file, 'metadata').errors[0]?.line;
  it.each([
    ['bad signature', 'WEBVTX\n\n00:01.000 --> 00:02.000\nhi\n'],
    ['unreadable timing', 'WEBVTT\n\n1\n00:01.000 --> 00:02,500\nhi\n'],
    ['end before start', 'WEBVTT\n\n00:00.000 --> 00:00.800\nok\n\n00:01.000 --> 00:00.500\nbackwards\n'],
  ])('%s', (_, file) => {
    expect(errorOf(() => parseWebVtt(file)).line).toBe(firstErrorLine(file));
  });

  it("a bare '<': the specification's tokenizer silently loses the words after it; we refuse instead", () => {
    const file = 'WEBVTT\n\n00:01.000 --> 00:02.000\nwhen x < 3 we stop\n';
    const ref = new WebVTTParser().parse(file, 'metadata');
    expect(JSON.stringify(ref.cues[0]!.tree)).not.toContain('we stop');
    expect(errorOf(() => parseWebVtt(file)).code).toBe('bad_cue_text');
  });
});

/** An invented SRT file: multi-line cues, italics, hours. */
function generatedSrt(cues: number, seed: number): string {
  const r = prng(seed);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(r() * xs.length)]!;
  const words = (n: number): string => Array.from({ length: n }, () => pick(WORDS)).join(' ');
  let t = 3_500_000;
  const blocks: string[] = [];
  for (let i = 0; i < cues; i++) {
    const start = (t += Math.floor(r() * 4000));
    const end = start + Math.floor(r() * 5000);
    const lines = r() < 0.5 ? `${words(4)}\n<i>${words(3)}</i>` : words(6);
    blocks.push(`${i + 1}\n${stamp(start, ',', true)} --> ${stamp(end, ',', true)}\n${lines}`);
  }
  return blocks.join('\n\n') + '\n';
}

describe('SRT: same cues, texts and times as the reference parser (srt-parser-2 1.2.3)', () => {
  it.each([
    ['fixtures/ferry-interview.srt', readFileSync(new URL('./fixtures/ferry-interview.srt', import.meta.url), 'utf8')],
    ['a generated file of 400 cues', generatedSrt(400, 7)],
  ])('%s', (_, file) => {
    const ref = new SrtParser().fromSrt(file).map((c) => [norm(c.text.replace(/<[^>]+>/g, '')), Math.round(c.startSeconds * 1000), Math.round(c.endSeconds * 1000)]);
    const ours = parseSrt(file, { mergeCues: false }).turns.map((t) => [(t.speaker ? `${t.speaker}: ` : '') + t.text, t.startMs, t.endMs]);
    expect(ours).toHaveLength(ref.length);
    expect(ours).toEqual(ref);
  });
});
