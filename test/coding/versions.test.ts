/**
 * Named versions round-trip: a version of the text and of the codebook is stored, listed and read
 * back as it stood, with the comparison against the current state (words added and removed, a
 * segment's quote then and now, a definition changed). Expected values are worked by hand from the
 * edits made here. Creation is for owner and lead, reading for members who may read the document.
 */
import { auditLog, eq } from '@gloss/db';
import { addSegment, correctText, getCodes, updateCodeField } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

interface VersionSummary {
  id: string;
  name: string;
  createdAt: string;
  createdBy: { id: string; name: string } | null;
}

describe.each(dbKinds())('versions on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('a text version shows the words as they stood, what changed since, and segments then and now', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const rua = await clientFor(server.url, 'coder');
    const layerRoom = (await rua.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`)).body.layers.find((l) => l.mine)!.room;
    const leadText = gcOffClient(server.url, lead.cookie, s.codingTextRoom);
    const ruaText = gcOffClient(server.url, rua.cookie, s.codingTextRoom);
    const ruaLayer = gcOffClient(server.url, rua.cookie, layerRoom);
    const clients = [leadText, ruaText, ruaLayer];
    try {
      await until(() => clients.every((c) => c.provider.synced), 'synced');
      const original = ruaText.doc.getText('text').toString();
      const at = original.indexOf('lent me a spade');
      const segId = addSegment(ruaLayer.doc, ruaText.doc, { codeId: s.codes.tools, start: at, end: at + 'lent me a spade'.length });
      // The segment is stored once another reader has it.
      const leadLayer = gcOffClient(server.url, lead.cookie, layerRoom);
      clients.push(leadLayer);
      await until(() => leadLayer.doc.getMap('segments').has(segId), 'segment stored');

      const made = await lead.call<VersionSummary>('POST', `/api/documents/${s.codingTextRoom}/versions`, { name: 'Before de-identification' });
      expect(made.status).toBe(201);
      expect(made.body).toMatchObject({ name: 'Before de-identification', createdBy: { id: s.users.lead.id } });

      const t = leadText.doc.getText('text');
      correctText(leadText.doc, t.toString().indexOf('me a spade'), 3);
      correctText(leadText.doc, t.toString().indexOf('spade'), 0, 'rusty ');
      const expected = original.replace('lent me a spade', 'lent a rusty spade');
      await until(() => ruaText.doc.getText('text').toString() === expected, 'correction relayed (so stored)');

      const list = await rua.call<VersionSummary[]>('GET', `/api/documents/${s.codingTextRoom}/versions`);
      expect(list.status).toBe(200);
      expect(list.body.map((v) => v.name)).toEqual(['Before de-identification']);

      const got = await rua.call<{
        kind: string;
        then: { text: string; turns: Array<{ speaker: string | null }> };
        comparison: {
          text: { added: Array<{ at: number; text: string }>; removed: Array<{ text: string }>; wordsAdded: number; wordsRemoved: number };
          segments: Array<{ id: string; then: { quote: string }; now: { quote: string } | null }>;
        };
      }>('GET', `/api/documents/${s.codingTextRoom}/versions/${made.body.id}`);
      expect(got.status).toBe(200);
      expect(got.body.kind).toBe('text');
      expect(got.body.then.text).toBe(original);
      expect(got.body.then.turns.map((x) => x.speaker)).toEqual(['Interviewer', 'P01', 'P01']);
      expect(got.body.comparison.text.added).toEqual([{ at: expected.indexOf('rusty '), text: 'rusty ' }]);
      expect(got.body.comparison.text.removed.map((r) => r.text)).toEqual(['me ']);
      expect(got.body.comparison.text).toMatchObject({ wordsAdded: 1, wordsRemoved: 1 });
      expect(got.body.comparison.segments).toEqual([
        expect.objectContaining({ id: segId, then: expect.objectContaining({ quote: 'lent me a spade' }), now: expect.objectContaining({ quote: 'lent a rusty spade' }) }),
      ]);

      // The lead reading the version reads Rua's segments: that is in the access log, as reading them
      // through the segments route is (issue 13, small leaks; DESIGN §6).
      expect((await lead.call('GET', `/api/documents/${s.codingTextRoom}/versions/${made.body.id}`)).status).toBe(200);
      const views = await lead.call<Array<{ userId: string; target: string; detail: { coderIds: string[]; versionId?: string } }>>('GET', `/api/studies/${s.studyId}/audit?action=segments.view`);
      const byVersion = views.body.filter((e) => e.detail.versionId === made.body.id && e.userId === s.users.lead.id);
      expect(byVersion.map((e) => e.target)).toEqual([s.codingTextId]);
      expect(byVersion[0]!.detail.coderIds).toContain(s.users.coder.id);
    } finally {
      for (const c of clients) c.destroy();
    }
  }, 90_000);

  it('a codebook version shows the entries as they stood and the definitions changed since', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const cb = gcOffClient(server.url, lead.cookie, s.codebookRoom);
    try {
      await until(() => cb.provider.synced && getCodes(cb.doc).length === 4, 'codebook synced');
      const made = await lead.call<VersionSummary>('POST', `/api/documents/${s.codebookRoom}/versions`, { name: 'Round 1 codebook' });
      expect(made.status).toBe(201);
      updateCodeField(cb.doc, s.codes.access, 'briefDefinition', 'Keys, sheds, water and the gate code.', { by: s.users.lead.id });
      const observer = await clientFor(server.url, 'observer');
      const check = gcOffClient(server.url, observer.cookie, s.codebookRoom);
      try {
        await until(() => check.provider.synced && getCodes(check.doc).find((c) => c.id === s.codes.access)?.briefDefinition.includes('gate') === true, 'edit stored');
      } finally {
        check.destroy();
      }
      const got = await observer.call<{
        kind: string;
        then: { codes: Array<{ id: string; briefDefinition: string }> };
        comparison: { added: unknown[]; removed: unknown[]; changed: Array<{ id: string; field: string; then: unknown; now: unknown }> };
      }>('GET', `/api/documents/${s.codebookRoom}/versions/${made.body.id}`);
      expect(got.status).toBe(200);
      expect(got.body.kind).toBe('codebook');
      expect(got.body.then.codes.find((c) => c.id === s.codes.access)!.briefDefinition).toBe('Keys, sheds, water.');
      expect(got.body.comparison).toEqual({
        added: [],
        removed: [],
        changed: [{ id: s.codes.access, label: 'Access to shared things', field: 'briefDefinition', then: 'Keys, sheds, water.', now: 'Keys, sheds, water and the gate code.' }],
      });
    } finally {
      cb.destroy();
    }
  }, 90_000);

  it('refuses writers without the role, unknown documents and the wrong kinds', async () => {
    const s = server.seeded;
    const coder = await clientFor(server.url, 'coder');
    expect((await coder.call('POST', `/api/documents/${s.codingTextRoom}/versions`, { name: 'mine' })).status).toBe(403);
    const outsider = await clientFor(server.url, 'outsider');
    expect((await outsider.call('GET', `/api/documents/${s.codingTextRoom}/versions`)).status).toBe(404);
    const lead = await clientFor(server.url, 'lead');
    expect((await lead.call('POST', `/api/documents/${s.memosRoom}/versions`, { name: 'memos' })).status).toBe(400);
    expect((await lead.call('POST', `/api/documents/${s.codingTextRoom}/versions`, { name: '' })).status).toBe(400);
    expect((await lead.call('GET', `/api/documents/${s.codingTextRoom}/versions/00000000-0000-4000-8000-000000000000`)).status).toBe(404);

    // Creation is in the audit log (checked with the server stopped: PGlite is single-process).
    await server.kill('SIGTERM');
    const rows = await server.withDb((d) => d.select().from(auditLog).where(eq(auditLog.action, 'version.create')));
    expect(rows.map((r) => r.userId)).toEqual([s.users.lead.id, s.users.lead.id]);
  }, 60_000);
});
