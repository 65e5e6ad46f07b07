import { strToU8, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { sampleStudy } from '../exchange/sample-study.js';
import { ExchangeError } from './errors.js';
import { codebookQdc, projectFile, projectQdpx } from './export.js';
import { importQdc, importQdpx } from './import.js';
import { validateAgainst } from './schema-check.js';

// Schema: REFI-QDA Project.xsd (QDA-XML 1.0, 18 March 2019), fixtures/Project.xsd, validated with
// libxml2 (xmllint-wasm). Facts about positions: REFI-QDA spec 1.5 §10.2 and its Annex A example.
const SCOPE = '6f0e2a8c-0000-4000-8000-000000000001';

const byQuote = (xs: Array<{ quote: string; coderId: string; codeId: string }>) => xs.map((s) => `${s.coderId}|${s.codeId}|${s.quote}`).sort();

describe('REFI-QDA export', () => {
  it('the project file validates against Project.xsd', async () => {
    const f = projectFile(sampleStudy(), SCOPE);
    const r = await validateAgainst(f.xml, 'project');
    expect(r.errors).toEqual([]);
    expect(r.valid).toBe(true);
  }, 60_000);

  it('the codebook file validates against the codebook schema derived from Project.xsd', async () => {
    const r = await validateAgainst(codebookQdc(sampleStudy(), SCOPE), 'codebook');
    expect(r.errors).toEqual([]);
    expect(r.valid).toBe(true);
  }, 60_000);

  it('the validator does refuse a broken file (a selection without endPosition)', async () => {
    const bad = projectFile(sampleStudy(), SCOPE).xml.replace(/ endPosition="\d+"/, '');
    expect((await validateAgainst(bad, 'project')).valid).toBe(false);
  }, 60_000);

  it('writes code-point positions with an exclusive end (text outside the BMP counts one per character)', () => {
    const f = projectFile(sampleStudy(), SCOPE);
    // "🐟🐟" is 2 code points (4 UTF-16 units) starting at code point 66 of text 1: by hand,
    // "We rowed out at dawn, \"before the gulls\", she said.\n" is 52 characters, "The nets were " 14.
    expect(f.xml).toMatch(/name="🐟🐟" startPosition="66" endPosition="68"/);
    expect(f.skipped).toBe(0);
  });
});

describe('REFI-QDA round trip (export, import)', () => {
  it('keeps texts, codes with hierarchy and colours, segments per coder with their words, memos, cases and attributes', () => {
    const s = sampleStudy();
    const back = importQdpx(projectQdpx(projectFile(s, SCOPE)));
    expect(back.endReading).toBe('exclusive');
    expect(back.texts.map((t) => [t.title, t.content])).toEqual(s.texts.map((t) => [t.title, t.content]));
    expect(back.texts[0]!.turns.map((t) => t.speaker)).toEqual(['P01', 'I', 'P01']);
    expect(back.texts[0]!.turns[2]!.startMs).toBe(61_250);
    const label = (id: string | null, codes: typeof s.codes) => codes.find((c) => c.id === id)?.label ?? null;
    expect(back.codes.map((c) => [c.label, label(c.parentId, back.codes), c.colour, c.type, c.status]).sort()).toEqual(
      s.codes.map((c) => [c.label, label(c.parentId, s.codes), c.colour, c.type, c.status]).sort(),
    );
    const work = back.codes.find((c) => c.label === 'Work at sea')!;
    expect([work.briefDefinition, work.fullDefinition, work.inclusion, work.exclusion]).toEqual(['Talk about fishing work.', 'Any account of the tasks of fishing.\nIncludes preparing nets.', 'Tasks, tools, hours.', 'Leisure sailing.']);
    expect(back.exampleQuotes.get(work.id)).toEqual({ examples: ['We rowed out at dawn'], nearMisses: ['was quiet'] });
    const coderName = (id: string, cs: typeof s.coders) => cs.find((c) => c.id === id)!.name;
    const codeName = (id: string, cs: typeof s.codes) => cs.find((c) => c.id === id)!.label;
    expect(byQuote(back.segments.map((x) => ({ ...x, coderId: coderName(x.coderId, back.coders), codeId: codeName(x.codeId, back.codes) })))).toEqual(
      byQuote(s.segments.map((x) => ({ ...x, coderId: coderName(x.coderId, s.coders), codeId: codeName(x.codeId, s.codes) }))),
    );
    expect(back.segments.find((x) => x.quote === '🐟🐟')!.note).toBe('the fish, drawn');
    expect(back.coders.map((c) => [c.name, c.email])).toEqual(s.coders.map((c) => [c.name, c.email]));
    expect(back.memos.map((m) => [m.kind, m.title, m.body, m.attachedTo.kind]).sort()).toEqual(s.memos.map((m) => [m.kind, m.title, m.body, m.attachedTo.kind]).sort());
    expect(back.groups.map((g) => [g.label, g.kind, g.codeIds.length])).toEqual([['Mood', 'exclusive', 2], ['Livelihood', 'theme', 2]]);
    expect(back.attributes.map((a) => [a.name, a.type, a.choices ?? null])).toEqual(s.attributes.map((a) => [a.name, a.type, a.choices ?? null]));
    const values = (c: (typeof s.cases)[number], attrs: typeof s.attributes) => Object.fromEntries(Object.entries(c.values).map(([k, v]) => [attrs.find((a) => a.id === k)!.name, v]));
    expect(back.cases.map((c) => [c.name, c.kind, values(c, back.attributes), c.textIds.length])).toEqual(s.cases.map((c) => [c.name, c.kind, values(c, s.attributes), c.textIds.length]));
  });

  it('a codebook file keeps codes, hierarchy, colours, definitions and sets', () => {
    const s = sampleStudy();
    const back = importQdc(codebookQdc(s, SCOPE));
    expect(back.codes.map((c) => c.label)).toEqual(['Work at sea', 'Nets, "heavy"', 'Catch', 'Calm']);
    expect(back.codes[2]!.parentId).toBe(back.codes[1]!.id);
    expect(back.codes[3]!.colour).toBe('#cc79a7');
    expect(back.groups.map((g) => g.kind)).toEqual(['exclusive', 'theme']);
  });
});

// Hand-written files in the standard's own form (not written by Gloss), after the spec's Annex A.
const G = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;
function handProject(opts: { text: string; selections: Array<[number, number]>; inline?: boolean; origin?: string }): string {
  const sel = opts.selections
    .map(([a, b], k) => `<PlainTextSelection guid="${G(100 + k)}" startPosition="${a}" endPosition="${b}"><Coding guid="${G(200 + k)}" creatingUser="${G(1)}"><CodeRef targetGUID="${G(12)}"/></Coding></PlainTextSelection>`)
    .join('');
  return `<?xml version="1.0" encoding="utf-8"?>
<Project xmlns="urn:QDA-XML:project:1.0" name="Hand made"${opts.origin ? ` origin="${opts.origin}"` : ''}>
  <Users><User guid="${G(1)}" name="Rhea Fenwick" id="rhea@example.org"/></Users>
  <CodeBook><Codes>
    <Code guid="${G(11)}" name="Weather" isCodable="false" color="#A2B"><Description>Anything about weather.</Description>
      <Code guid="{${G(12).toUpperCase()}}" name="Storm" isCodable="true" color="#112233"/>
    </Code>
  </Codes></CodeBook>
  <Sources>
    <TextSource guid="${G(50)}" name="Field note"${opts.inline ? '' : ` plainTextPath="internal://${G(50)}.txt"`}>${opts.inline ? `<PlainTextContent>${opts.text}</PlainTextContent>` : ''}${sel}</TextSource>
  </Sources>
  <Sets><Set guid="${G(70)}" name="Sky"><MemberCode targetGUID="${G(11)}"/><MemberCode targetGUID="${G(12)}"/></Set></Sets>
</Project>`;
}
const qdpx = (xml: string, files: Record<string, string> = {}) =>
  zipSync({ 'project.qde': strToU8(xml), ...Object.fromEntries(Object.entries(files).map(([k, v]) => [k, strToU8(v)])) });

describe('REFI-QDA import of hand-written files (NOTES.md edge cases)', () => {
  const text = 'Rain came sideways. The storm took 🐟 nets.';
  it('validates: our hand-written file is itself a valid project', async () => {
    expect((await validateAgainst(handProject({ text, selections: [[0, 4]] }), 'project')).valid).toBe(true);
  }, 60_000);

  it('a text given by plainTextPath, nested codes (GUID in braces), 3-digit colour, sets', () => {
    const r = importQdpx(qdpx(handProject({ text, selections: [[20, 29]] }), { [`sources/${G(50)}.txt`]: text }));
    expect(r.texts[0]!.content).toBe(text);
    expect(r.codes.map((c) => [c.label, c.parentId, c.colour])).toEqual([['Weather', null, '#aa22bb'], ['Storm', G(11), '#112233']]);
    expect(r.groups).toEqual([{ id: G(70), label: 'Sky', kind: 'theme', codeIds: [G(11), G(12)] }]);
    expect(r.coders).toEqual([{ id: G(1), name: 'Rhea Fenwick', email: 'rhea@example.org' }]);
    expect(r.segments[0]!.quote).toBe('The storm');
  });

  it('exclusive end: a selection ending after the last character proves it (Annex A: end − start = length)', () => {
    const n = [...text].length; // 43 code points: the fish is one
    const r = importQdpx(qdpx(handProject({ text, selections: [[20, 29], [35, n]] }), { [`sources/${G(50)}.txt`]: text }));
    expect(r.endReading).toBe('exclusive');
    expect(r.segments.map((s) => s.quote)).toEqual(['The storm', '🐟 nets.']);
  });

  it('inclusive end: a one-character selection with start = end shows the "last character" reading', () => {
    const r = importQdpx(qdpx(handProject({ text, selections: [[20, 28], [35, 35]], inline: true })));
    expect(r.endReading).toBe('inclusive');
    expect(r.segments.map((s) => s.quote)).toEqual(['The storm', '🐟']);
  });

  it('the reading can be forced', () => {
    const r = importQdpx(qdpx(handProject({ text, selections: [[20, 28]], inline: true })), { endPosition: 'inclusive' });
    expect(r.segments[0]!.quote).toBe('The storm');
  });
});

describe('malformed and hostile archives get a typed error', () => {
  const text = 'Short text.';
  const code = (f: () => unknown) => {
    try {
      f();
    } catch (e) {
      expect(e).toBeInstanceOf(ExchangeError);
      return (e as ExchangeError).code;
    }
    return 'no error';
  };
  it('not a zip', () => expect(code(() => importQdpx(strToU8('hello')))).toBe('not_zip'));
  it('no project.qde', () => expect(code(() => importQdpx(zipSync({ 'x.txt': strToU8('x') })))).toBe('no_project'));
  it('bad XML', () => expect(code(() => importQdpx(qdpx('<Project name="x"><Users></Project>')))).toBe('bad_xml'));
  it('a DOCTYPE (entity expansion) is refused', () =>
    expect(code(() => importQdpx(qdpx('<?xml version="1.0"?><!DOCTYPE p [<!ENTITY a "aaaa">]><Project xmlns="urn:QDA-XML:project:1.0" name="&a;"/>')))).toBe('bad_xml'));
  it('missing source file', () => expect(code(() => importQdpx(qdpx(handProject({ text, selections: [] }))))).toBe('missing_source'));
  it('a source outside the archive', () =>
    expect(code(() => importQdpx(qdpx(handProject({ text, selections: [] }).replace(`internal://${G(50)}.txt`, 'absolute:///etc/passwd'))))).toBe('unsupported_source'));
  it('path traversal in an entry name', () =>
    expect(code(() => importQdpx(zipSync({ 'project.qde': strToU8(handProject({ text, selections: [] })), '../../evil.txt': strToU8('x') })))).toBe('unsafe_path'));
  it('an absolute entry name', () => expect(code(() => importQdpx(zipSync({ '/etc/x': strToU8('x'), 'project.qde': strToU8('<a/>') })))).toBe('unsafe_path'));
  it('a huge entry (over the per-entry limit, judged before inflating)', () => {
    const big = new Uint8Array(3 * 1024 * 1024); // zeros deflate to a few KiB
    const zip = zipSync({ 'project.qde': strToU8(handProject({ text, selections: [] })), [`sources/${G(50)}.txt`]: big });
    expect(zip.byteLength).toBeLessThan(64 * 1024);
    expect(code(() => importQdpx(zip, { limits: { maxEntryBytes: 1024 * 1024 } }))).toBe('too_large');
  });
  it('a selection outside its text', () =>
    expect(code(() => importQdpx(qdpx(handProject({ text, selections: [[2, 400]] }), { [`sources/${G(50)}.txt`]: text })))).toBe('bad_position'));
  it('a coding naming a code that is not there', () =>
    expect(code(() => importQdpx(qdpx(handProject({ text, selections: [[0, 2]] }).replace(`<CodeRef targetGUID="${G(12)}"/>`, `<CodeRef targetGUID="${G(99)}"/>`), { [`sources/${G(50)}.txt`]: text })))).toBe('bad_reference'));
  it('source text that is not UTF-8', () =>
    expect(code(() => importQdpx(zipSync({ 'project.qde': strToU8(handProject({ text, selections: [] })), [`sources/${G(50)}.txt`]: new Uint8Array([0x66, 0xff, 0xfe]) })))).toBe('bad_encoding'));
});
