import { zipSync, strToU8 } from 'fflate';
import { describe, expect, it } from 'vitest';
import { importDocx } from './docx.js';
import type { ImportError } from './import-error.js';
import { refusalOf } from './test-support.js';

// A minimal WordprocessingML package as ECMA-376 (Office Open XML) describes it, from memory:
// Part 2 (Open Packaging Conventions) gives [Content_Types].xml and the package relationship in
// _rels/.rels pointing at the main document; Part 1 gives w:document/w:body/w:p (paragraph),
// w:r (run), w:t (text), w:br (break) and w:tab, and tables as w:tbl/w:tr/w:tc.
const W = 'http://schemas.openxmlformats.org/wordprocessingml/2006/main';
const CONTENT_TYPES =
  '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>' +
  '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
  '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>' +
  '<Default Extension="xml" ContentType="application/xml"/>' +
  '<Override PartName="/word/document.xml" ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/>' +
  '</Types>';
const RELS =
  '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>' +
  '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
  '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/>' +
  '</Relationships>';

const esc = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
const run = (text: string, bold = false): string =>
  `<w:r>${bold ? '<w:rPr><w:b/></w:rPr>' : ''}<w:t xml:space="preserve">${esc(text)}</w:t></w:r>`;
const para = (...runs: string[]): string => `<w:p>${runs.join('')}</w:p>`;

function docx(body: string, extra: Record<string, Uint8Array> = {}): Uint8Array {
  return zipSync({
    '[Content_Types].xml': strToU8(CONTENT_TYPES),
    '_rels/.rels': strToU8(RELS),
    'word/document.xml': strToU8(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><w:document xmlns:w="${W}"><w:body>${body}</w:body></w:document>`),
    ...extra,
  });
}

const importError = (bytes: Uint8Array): Promise<ImportError> => refusalOf(importDocx(bytes));

describe('DOCX: a real package built in the test', () => {
  it('paragraphs with speaker labels split across runs, timestamps, breaks and tabs', async () => {
    const body = [
      para(run('Community garden study, interview 2 (invented)')),
      para(run('[00:00:03] '), run('Interviewer:', true), run(' What brought you to the garden?')),
      para(run('P02: ', true), run('My daughter did. '), run('She said: come once.')),
      para(),
      para(run('So I came.'), '<w:r><w:br/></w:r>', run('And stayed.')),
      para(run('Interviewer:', true), '<w:r><w:tab/></w:r>', run('(01:05) For how long?')),
    ].join('');
    const { turns } = await importDocx(docx(body));
    expect(turns).toEqual([
      { speaker: null, startMs: null, endMs: null, text: 'Community garden study, interview 2 (invented)' },
      { speaker: 'Interviewer', startMs: 3000, endMs: null, text: 'What brought you to the garden?' },
      { speaker: 'P02', startMs: null, endMs: null, text: 'My daughter did. She said: come once.\n\nSo I came.\nAnd stayed.' },
      { speaker: 'Interviewer', startMs: 65_000, endMs: null, text: 'For how long?' },
    ]);
  });

  it('reads paragraphs inside tables, in document order', async () => {
    const cell = (t: string): string => `<w:tc>${para(run(t))}</w:tc>`;
    const body = `<w:tbl><w:tr>${cell('I: first')}</w:tr><w:tr>${cell('P1: second')}</w:tr></w:tbl>`;
    expect((await importDocx(docx(body))).turns.map((t) => [t.speaker, t.text])).toEqual([
      ['I', 'first'],
      ['P1', 'second'],
    ]);
  });

  it('tracked changes: inserted text is read, deleted text is not (w:ins, w:del)', async () => {
    const body = para(run('P1: we '), `<w:ins w:id="1" w:author="x">${run('never ')}</w:ins>`, `<w:del w:id="2" w:author="x"><w:r><w:delText>always </w:delText></w:r></w:del>`, run('went back'));
    expect((await importDocx(docx(body))).turns[0]!.text).toBe('we never went back');
  });

  it('error locations are paragraph numbers', async () => {
    const body = para(run('I: fine')) + para() + para(run('P1: [00:99] bad'));
    const e = await importError(docx(body));
    expect([e.code, e.line, e.format]).toEqual(['bad_timestamp', 3, 'docx']);
    expect(e.message).toMatch(/^paragraph 3, column 5: /);
  });

  it('reports progress up to 1', async () => {
    const seen: number[] = [];
    await importDocx(docx(para(run('I: hello'))), { onProgress: (f) => seen.push(f) });
    expect(seen.at(-1)).toBe(1);
    expect(seen.every((f, i) => i === 0 || f > seen[i - 1]!)).toBe(true);
  });
});

describe('DOCX: broken files', () => {
  it('a file that is not a ZIP', async () => {
    const e = await importError(new TextEncoder().encode('I: this is plain text renamed to .docx'));
    expect([e.code, e.format, e.line]).toEqual(['not_zip', 'docx', null]);
  });

  it('a ZIP without the main document', async () => {
    const bytes = zipSync({ '[Content_Types].xml': strToU8(CONTENT_TYPES), '_rels/.rels': strToU8(RELS), 'notes.txt': strToU8('hi') });
    const e = await importError(bytes);
    expect(e.code).toBe('no_document');
    expect(e.message).toContain('word/document.xml');
  });

  it('a truncated ZIP', async () => {
    const whole = docx(para(run('I: hello there, this will be cut')));
    const e = await importError(whole.subarray(0, Math.floor(whole.length / 2)));
    expect(e.code).toBe('not_zip');
  });

  it('a main document that is not well-formed XML', async () => {
    const bytes = docx('', { 'word/document.xml': strToU8(`<w:document xmlns:w="${W}"><w:body><w:p><w:r><w:t>oops</w:body>`) });
    expect((await importError(bytes)).code).toBe('bad_docx');
  });

  it('a document with no text', async () => {
    expect((await importError(docx(para() + para()))).code).toBe('empty');
  });

  it('an archive that would unpack far beyond the size limit', async () => {
    const big = zipSync({ 'word/document.xml': new Uint8Array(2_000_000) }, { level: 9 });
    const e = await refusalOf(importDocx(big, { maxBytes: 20_000 }));
    expect(e.code).toBe('too_large');
  });
});
