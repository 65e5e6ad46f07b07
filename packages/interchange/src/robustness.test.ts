import { readFileSync } from 'node:fs';
import { strToU8, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { ImportError } from './import-error.js';
import { importTranscript } from './import-transcript.js';

// Common practice (mutation fuzzing): damaged input must end in a transcript or an ImportError,
// never in another exception, a hang or a partial result.
const fixture = (name: string): Uint8Array => new Uint8Array(readFileSync(new URL(`./fixtures/${name}`, import.meta.url)));

function docxFixture(): Uint8Array {
  const W = 'http://schemas.openxmlformats.org/wordprocessingml/2006/main';
  return zipSync(
    {
      '[Content_Types].xml': strToU8(
        '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="xml" ContentType="application/xml"/><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Override PartName="/word/document.xml" ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/></Types>',
      ),
      '_rels/.rels': strToU8(
        '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/></Relationships>',
      ),
      'word/document.xml': strToU8(
        `<w:document xmlns:w="${W}"><w:body><w:p><w:r><w:t>I: where did you grow up?</w:t></w:r></w:p><w:p><w:r><w:t>P1: [00:12] by the canal</w:t></w:r></w:p></w:body></w:document>`,
      ),
    },
    { level: 0 },
  );
}

function mutate(src: Uint8Array, rand: () => number): Uint8Array {
  const b = Uint8Array.from(src);
  const kind = Math.floor(rand() * 4);
  if (kind === 0) return b.subarray(0, Math.floor(rand() * b.length));
  const n = 1 + Math.floor(rand() * 4);
  for (let k = 0; k < n; k++) {
    const i = Math.floor(rand() * b.length);
    b[i] = kind === 1 ? Math.floor(rand() * 256) : kind === 2 ? '<>:-[]&\n0'.charCodeAt(Math.floor(rand() * 9)) : b[(i + 7) % b.length]!;
  }
  return b;
}

describe('damaged files end in a transcript or an ImportError', () => {
  const cases: Array<[string, Uint8Array, number]> = [
    ['harbour-interview.vtt', fixture('harbour-interview.vtt'), 600],
    ['ferry-interview.srt', fixture('ferry-interview.srt'), 600],
    ['allotment-interview.txt', fixture('allotment-interview.txt'), 600],
    ['interview.docx', docxFixture(), 150],
  ];
  it.each(cases)('%s, mutated repeatedly', async (filename, bytes, rounds) => {
    let seed = 99;
    const rand = (): number => ((seed = (seed * 1103515245 + 12345) >>> 0) >>> 8) / 0x1000000;
    const outcomes = { ok: 0, refused: 0 };
    for (let r = 0; r < rounds; r++) {
      try {
        const t = await importTranscript({ filename, bytes: mutate(bytes, rand) });
        expect(Array.isArray(t.turns)).toBe(true);
        for (const turn of t.turns) expect(typeof turn.text).toBe('string');
        outcomes.ok++;
      } catch (e) {
        if (!(e instanceof ImportError)) throw new Error(`round ${r}: ${String(e)}`);
        outcomes.refused++;
      }
    }
    // Both outcomes occur, so the mutations neither all break nor all spare the file.
    expect(outcomes.ok).toBeGreaterThan(0);
    expect(outcomes.refused).toBeGreaterThan(0);
  });
});
