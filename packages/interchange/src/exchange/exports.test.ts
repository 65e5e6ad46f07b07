import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { codebookCsv, codebookMarkdown, CODEBOOK_COLUMNS } from './codebook-export.js';
import { csvField } from './csv.js';
import { memosMarkdown } from './memos-markdown.js';
import { sampleStudy } from './sample-study.js';
import { SEGMENT_COLUMNS, segmentsCsv } from './segments-csv.js';

// CSV read back with papaparse (a general-purpose CSV parser from the npm registry), against
// RFC 4180 §2: quoted fields may hold commas, CRLF and doubled quotes.
async function collect(gen: AsyncIterable<string>): Promise<string> {
  let s = '';
  for await (const c of gen) s += c;
  return s;
}
const parse = (csv: string) => {
  const r = Papa.parse<string[]>(csv.replace(/^\uFEFF/, ''), { newline: '\r\n', skipEmptyLines: true });
  expect(r.errors).toEqual([]);
  return r.data;
};

describe('CSV fields (RFC 4180 §2)', () => {
  it('quotes only when needed and doubles inner quotes', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField(null)).toBe('');
  });
});

describe('segments CSV', () => {
  it('one record per segment with both offset kinds, read back exactly by a general CSV parser', async () => {
    const s = sampleStudy();
    const progress: number[] = [];
    const csv = await collect(segmentsCsv(s, s.texts.map((text) => ({ text, segments: s.segments.filter((x) => x.textId === text.id) })), { totalTexts: 2, onProgress: (f) => progress.push(f) }));
    expect(csv.startsWith('\uFEFF')).toBe(true);
    const rows = parse(csv);
    const head = rows[0]!;
    expect(head).toEqual([...SEGMENT_COLUMNS, 'attribute: Age', 'attribute: Home port', 'attribute: Fishing since', 'attribute: Owns a boat']);
    expect(rows).toHaveLength(1 + s.segments.length);
    const rec = (id: string) => Object.fromEntries(head.map((h, i) => [h, rows.find((r) => r[0] === id)![i]]));
    // outside the BMP: "🐟🐟" starts at UTF-16 offset 66 and code point 66 but ends at 70 vs 68 (by hand)
    expect(rec('s2')).toMatchObject({ quote: '🐟🐟', start_utf16: '66', end_utf16: '70', start_code_point: '66', end_code_point: '68', code_path: 'Work at sea / Nets, "heavy" / Catch', coder: 'Ada Quillfeather', speaker: 'I', timestamp: '0:00:04.000', note: 'the fish, drawn', cases: 'P01 Mira', 'attribute: Age': '54', 'attribute: Home port': 'North', 'attribute: Owns a boat': 'true' });
    expect(rec('s3').start_code_point).toBe('52');
    expect(rec('s3').end_code_point).toBe(String(52 + [...'The nets were 🐟🐟 heavy — ça pèse'].length));
    expect(rec('s4').quote).toBe('港口 was quiet.');
    expect(rec('s4').timestamp).toBe('0:01:01.250');
    expect(rec('s5').quote).toBe('Line two, with a comma, and "quotes".');
    expect(rec('s6').quote).toBe('"before the gulls",');
    for (const seg of s.segments) expect(rec(seg.id).quote).toBe(seg.quote);
    expect(progress.at(-1)).toBe(1);
  });
});

describe('codebook exports', () => {
  it('CSV has every field of the entry, one record per code, parents first', () => {
    const rows = parse(codebookCsv(sampleStudy()));
    expect(rows[0]).toEqual([...CODEBOOK_COLUMNS]);
    const rec = Object.fromEntries(rows[0]!.map((h, i) => [h, rows[1]![i]]));
    expect(rec).toMatchObject({
      label: 'Work at sea',
      full_definition: 'Any account of the tasks of fishing.\nIncludes preparing nets.',
      when_to_use: 'Tasks, tools, hours.',
      when_not_to_use: 'Leisure sailing.',
      examples: 'We rowed out at dawn',
      near_misses: 'was quiet',
      mutually_exclusive_sets: 'Mood',
      themes: 'Livelihood',
      type: 'theory-driven',
    });
    expect(rec.history).toMatch(/Ada Quillfeather — add/);
    expect(rows.slice(1).map((r) => r[1])).toEqual(['Work at sea', 'Nets, "heavy"', 'Catch', 'Calm']);
  });

  it('Markdown nests headings by depth and names every field', () => {
    const md = codebookMarkdown(sampleStudy());
    expect(md).toMatch(/^## Work at sea$/m);
    expect(md).toMatch(/^### Nets, "heavy"$/m);
    expect(md).toMatch(/^#### Catch$/m);
    for (const f of ['Brief definition', 'Full definition', 'When to use', 'When not to use', 'Examples', 'Near-misses', 'History']) expect(md).toContain(`**${f}:**`);
    expect(md).toContain('> We rowed out at dawn');
  });
});

describe('memos Markdown', () => {
  it('memos then jottings, each with author, dates and what it is about', () => {
    const s = sampleStudy();
    const md = memosMarkdown(s, { textTitles: new Map(s.texts.map((t) => [t.id, t.title])), segments: new Map(s.segments.map((x) => [x.id, x])) });
    expect(md.indexOf('## Memos (3)')).toBeLessThan(md.indexOf('## Jottings (1)'));
    expect(md).toContain('- By: Bo Lindqvist-Marr');
    expect(md).toContain('- About: code Work at sea');
    expect(md).toContain('- About: a segment of text “Interview P01, quay”: “🐟🐟”');
    expect(md).toContain('Dawn recurs.\nAsk about winter.');
  });

  it('lists replies under their memo, oldest first, a reply of several lines kept inside its list item', () => {
    const s = sampleStudy();
    const jot = s.memos.find((m) => m.kind === 'jotting')!;
    const at = jot.createdAt;
    jot.replies = [
      { id: 'r2', author: 'u-ada', body: 'Drawn, I think.\nAsk P01.', createdAt: at + 3 },
      { id: 'r1', author: 'u-bo', body: 'Or a sticker?', createdAt: at + 2 },
    ];
    const md = memosMarkdown(s, { textTitles: new Map(s.texts.map((t) => [t.id, t.title])) });
    const section = md.slice(md.indexOf('## Jottings'));
    // common practice (CommonMark 0.31 §5.2): a list item's continuation lines are indented to its content
    expect(section).toContain(`#### Replies (2)\n\n- Bo Lindqvist-Marr, ${new Date(at + 2).toISOString()}: Or a sticker?\n- `);
    expect(section).toContain(': Drawn, I think.\n  Ask P01.');
    expect(section.indexOf('fish emoji')).toBeLessThan(section.indexOf('#### Replies'));
    expect(md.slice(0, md.indexOf('## Jottings'))).not.toContain('#### Replies'); // memos without replies have no thread heading
  });
});
