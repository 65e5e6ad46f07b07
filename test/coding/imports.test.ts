/**
 * Transcript upload through the API, each format the importers read (invented transcripts written
 * here), raw and multipart bodies, NDJSON progress, a broken file of each kind that can break
 * (422 naming the place; nothing created), the size limit and role refusals. Expected texts are the
 * transcripts' words, one speaker turn per line (DESIGN §2: turns joined with a line break).
 */
import { once } from 'node:events';
import { createRequire } from 'node:module';
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

// fflate is the interchange package's ZIP library; borrowed from there to build a real .docx.
const { zipSync, strToU8 } = createRequire(new URL('../../packages/interchange/package.json', import.meta.url))('fflate') as {
  zipSync(files: Record<string, Uint8Array>): Uint8Array;
  strToU8(s: string): Uint8Array;
};

const VTT = `WEBVTT

00:00:01.000 --> 00:00:04.000
<v Interviewer>When did the reading group begin?

00:00:04.500 --> 00:00:08.000
<v Anneli>In the winter the library closed early.
`;

// Line 7 has a timing line with minutes out of range.
const BROKEN_VTT = `WEBVTT

00:00:01.000 --> 00:00:04.000
<v Interviewer>When did the reading group begin?

00:00:04.500 --> 00:00:08.000
00:0x:09.000 --> 00:00:12.000
<v Anneli>In the winter.
`;

const SRT = `1
00:00:01,000 --> 00:00:02,500
KAI: The ferry left at six.

2
00:00:03,000 --> 00:00:05,000
INTERVIEWER: Every day?
`;

// A minimal WordprocessingML package (ECMA-376 Parts 1 and 2, from memory), as the interchange tests build it.
function docx(paragraphs: string[]): Uint8Array {
  const W = 'http://schemas.openxmlformats.org/wordprocessingml/2006/main';
  const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;');
  return zipSync({
    '[Content_Types].xml': strToU8(
      '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
        '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/>' +
        '<Override PartName="/word/document.xml" ContentType="application/vnd.openxmlformats-officedocument.wordprocessingml.document.main+xml"/></Types>',
    ),
    '_rels/.rels': strToU8(
      '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
        '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/></Relationships>',
    ),
    'word/document.xml': strToU8(
      `<?xml version="1.0" encoding="UTF-8"?><w:document xmlns:w="${W}"><w:body>${paragraphs
        .map((p) => `<w:p><w:r><w:t xml:space="preserve">${esc(p)}</w:t></w:r></w:p>`)
        .join('')}</w:body></w:document>`,
    ),
  });
}

interface TextOut {
  id: string;
  title: string;
  room: string;
  sourceFormat: string;
  wordCount: number;
}
interface ErrorOut {
  error: { code: string; message: string; details?: { line: number | null; format: string } };
}

describe.each(dbKinds())('transcript import on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding, env: { MAX_BODY_BYTES: '65536' } });
  }, 120_000);
  afterAll(async () => server?.stop());

  const importPath = () => `/api/studies/${server.seeded.studyId}/texts/import`;

  async function upload(person: 'owner' | 'lead' | 'coder' | 'outsider', file: { name: string; bytes: Uint8Array | string; type?: string }, accept?: string) {
    const c = await clientFor(server.url, person);
    const form = new FormData();
    form.append('file', new Blob([file.bytes as BlobPart], { type: file.type ?? 'application/octet-stream' }), file.name);
    const res = await fetch(`${server.url}${importPath()}`, {
      method: 'POST',
      headers: { cookie: c.cookie, origin: server.url, ...(accept ? { accept } : {}) },
      body: form,
    });
    return res;
  }

  async function textCount(): Promise<number> {
    const c = await clientFor(server.url, 'owner');
    const res = await c.call<unknown[]>('GET', `/api/studies/${server.seeded.studyId}/texts`);
    return res.body.length;
  }

  async function storedText(room: string): Promise<string> {
    const c = await clientFor(server.url, 'lead');
    const client = gcOffClient(server.url, c.cookie, room);
    try {
      await until(() => client.provider.synced, 'text synced');
      return client.doc.getText('text').toString();
    } finally {
      client.destroy();
    }
  }

  it('imports WebVTT (multipart), SRT (raw body) and DOCX (multipart) as texts with their words', async () => {
    const vtt = await upload('lead', { name: 'reading-group.vtt', bytes: VTT, type: 'text/vtt' });
    expect(vtt.status).toBe(201);
    const v = (await vtt.json()) as TextOut;
    expect(v).toMatchObject({ title: 'reading-group', sourceFormat: 'vtt', wordCount: 13 });
    expect(await storedText(v.room)).toBe('When did the reading group begin?\nIn the winter the library closed early.');

    const owner = await clientFor(server.url, 'owner');
    const srt = await owner.call<TextOut>('POST', `${importPath()}?filename=ferry.srt&title=Ferry%20talk`, SRT, { 'content-type': 'application/x-subrip' });
    expect(srt.status).toBe(201);
    expect(srt.body).toMatchObject({ title: 'Ferry talk', sourceFormat: 'srt', wordCount: 7 });
    expect(await storedText(srt.body.room)).toBe('The ferry left at six.\nEvery day?');

    const d = await upload('owner', { name: 'choir.docx', bytes: docx(['Interviewer: What did the choir sing?', 'P04: Mostly songs from the valley.']) });
    expect(d.status).toBe(201);
    const dt = (await d.json()) as TextOut;
    expect(dt).toMatchObject({ title: 'choir', sourceFormat: 'docx' });
    expect(await storedText(dt.room)).toBe('What did the choir sing?\nMostly songs from the valley.');

    const txt = await owner.call<TextOut>('POST', `${importPath()}?filename=notes.txt`, 'I: Who kept the minutes?\nP09: Nobody, at first.', { 'content-type': 'text/plain' });
    expect(txt.status).toBe(201);
    expect(await storedText(txt.body.room)).toBe('Who kept the minutes?\nNobody, at first.');
  }, 90_000);

  it('streams NDJSON progress lines ending with the text when asked', async () => {
    const res = await upload('lead', { name: 'ndjson.vtt', bytes: VTT }, 'application/x-ndjson');
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/application\/x-ndjson/);
    const lines = (await res.text()).trim().split('\n').map((l) => JSON.parse(l) as { progress?: number; text?: TextOut });
    const progress = lines.filter((l) => l.progress !== undefined).map((l) => l.progress!);
    expect(progress.length).toBeGreaterThan(0);
    expect(progress).toEqual([...progress].sort((a, b) => a - b));
    expect(progress[progress.length - 1]).toBe(1);
    expect(lines[lines.length - 1]!.text).toMatchObject({ title: 'ndjson', sourceFormat: 'vtt' });
  }, 60_000);

  it('refuses broken files with 422 naming the place, and creates nothing', async () => {
    const before = await textCount();
    const vtt = await upload('lead', { name: 'broken.vtt', bytes: BROKEN_VTT });
    expect(vtt.status).toBe(422);
    const ve = (await vtt.json()) as ErrorOut;
    expect(ve.error.code).toMatch(/^[a-z_]+$/);
    expect(ve.error.details).toMatchObject({ format: 'webvtt', line: 7 });
    expect(ve.error.message).toMatch(/line 7/);

    const notZip = await upload('lead', { name: 'letter.docx', bytes: 'this is not a zip archive' });
    expect(notZip.status).toBe(422);
    expect(((await notZip.json()) as ErrorOut).error.code).toBe('not_zip');

    const pdf = await upload('lead', { name: 'scan.pdf', bytes: '%PDF-1.4' });
    expect(pdf.status).toBe(422);
    expect(((await pdf.json()) as ErrorOut).error.code).toBe('unsupported_format');

    // Through the NDJSON stream the failure is the last line.
    const streamed = await upload('lead', { name: 'broken.vtt', bytes: BROKEN_VTT }, 'application/x-ndjson');
    const last = JSON.parse((await streamed.text()).trim().split('\n').pop()!) as ErrorOut;
    expect(last.error.details).toMatchObject({ line: 7 });
    expect(await textCount()).toBe(before);
  }, 60_000);

  it('enforces the size limit and the roles', async () => {
    const before = await textCount();
    const big = await upload('lead', { name: 'big.txt', bytes: 'P01: words words words\n'.repeat(4000) });
    expect(big.status).toBe(413);
    expect(((await big.json()) as ErrorOut).error.code).toBe('body_too_large');
    expect((await upload('coder', { name: 'x.txt', bytes: 'I: hello there' })).status).toBe(403);
    expect((await upload('outsider', { name: 'x.txt', bytes: 'I: hello there' })).status).toBe(404);
    const owner = await clientFor(server.url, 'owner');
    expect((await owner.call<ErrorOut>('POST', importPath(), 'I: no name', { 'content-type': 'text/plain' })).status).toBe(400);
    expect(await textCount()).toBe(before);
  }, 60_000);

  // A refused body is read to its end before the 413 goes out. Answering early left the body unread;
  // @hono/node-server then gives it 500 ms to drain and destroys the socket, and a client still sending
  // (a slow upload, or a busy machine) got a reset connection instead of "too large".
  it('answers 413 after reading the refused body, keeping the connection usable', async () => {
    const before = await textCount();
    const declared = await upload('lead', { name: 'huge.txt', bytes: new Uint8Array(5 * 1024 * 1024).fill(0x61) });
    expect(declared.status).toBe(413);
    expect(((await declared.json()) as ErrorOut).error.code).toBe('body_too_large');

    // A slow client on one keep-alive connection: headers and 256 KiB, a 1.5 s pause (past that 500 ms
    // window), the rest, then a second request on the same socket. Both must be answered.
    const lead = await clientFor(server.url, 'lead');
    const { hostname, port } = new URL(server.url);
    const socket = net.connect(Number(port), hostname);
    await once(socket, 'connect');
    let received = '';
    socket.setEncoding('latin1');
    socket.on('data', (d: string) => (received += d));
    const closed = new Promise<string>((resolve) => socket.on('close', () => resolve('closed')).on('error', (e) => resolve(String(e))));
    const total = 1024 * 1024;
    socket.write(
      `POST ${importPath()} HTTP/1.1\r\nHost: ${hostname}:${port}\r\nOrigin: ${server.url}\r\nCookie: ${lead.cookie}\r\n` +
        `Content-Type: text/plain\r\nContent-Length: ${total}\r\n\r\n`,
    );
    socket.write(Buffer.alloc(256 * 1024, 0x62));
    await new Promise((r) => setTimeout(r, 1500));
    socket.write(Buffer.alloc(total - 256 * 1024, 0x62));
    await until(() => received.includes('body_too_large'), 'the 413 answer');
    expect(received.startsWith('HTTP/1.1 413')).toBe(true);
    socket.write(`GET /api/health HTTP/1.1\r\nHost: ${hostname}:${port}\r\n\r\n`);
    const second = await Promise.race([until(() => /HTTP\/1\.1 200/.test(received.slice(received.indexOf('body_too_large'))), 'the second answer on the same connection').then(() => 'answered'), closed]);
    expect(second, received).toBe('answered');
    socket.destroy();
    expect(await textCount()).toBe(before);
  }, 60_000);
});
