/**
 * The coding model's "done when": a lead corrects the text while two coders code their layers, with
 * corrections before, inside and at both edges of coded passages. After the stock y-websocket clients
 * converge, GET /api/texts/:id/segments must give each segment's quote as (a) Yjs's own one-by-one
 * resolution (createAbsolutePositionFromRelativePosition, followUndoneDeletions = false) computes it
 * on a converged client's documents and (b) as worked out by hand from the original words minus the
 * deleted ones. The anchoring rules (start assoc 0, end assoc -1, deleted segments collapse) are
 * DESIGN §2; Yjs v13 RelativePosition semantics are from the Yjs documentation.
 */
import { projectedSegments, eq } from '@gloss/db';
import { addSegment, correctText, listSegments } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import type { SegmentOut } from '../../apps/server/src/http/segments.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

describe.each(dbKinds())('segments under concurrent correction on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('returns the quotes the converged documents and the hand-worked corrections give', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const rua = await clientFor(server.url, 'coder');
    const bo = await clientFor(server.url, 'coder2');
    const layerRoom = async (c: typeof rua) => {
      const res = await c.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`);
      expect(res.status).toBe(200);
      return res.body.layers.find((l) => l.mine)!.room;
    };
    const ruaLayerRoom = await layerRoom(rua);
    const boLayerRoom = await layerRoom(bo);

    const leadText = gcOffClient(server.url, lead.cookie, s.codingTextRoom);
    const ruaText = gcOffClient(server.url, rua.cookie, s.codingTextRoom);
    const boText = gcOffClient(server.url, bo.cookie, s.codingTextRoom);
    const ruaLayer = gcOffClient(server.url, rua.cookie, ruaLayerRoom);
    const boLayer = gcOffClient(server.url, bo.cookie, boLayerRoom);
    const all = [leadText, ruaText, boText, ruaLayer, boLayer];
    const extra: Array<{ destroy(): void }> = [];
    try {
      await until(() => all.every((c) => c.provider.synced), 'all clients synced');
      const original = 'How did you start with the allotment?\nMy neighbour lent me a spade and a plot for the summer.\nThen the committee gave us keys to the shed.';
      expect(ruaText.doc.getText('text').toString()).toBe(original);

      // The lead goes offline and corrects; the coders meanwhile code the uncorrected words: concurrent.
      leadText.provider.disconnect();
      const ld = leadText.doc;
      const at = (needle: string) => {
        const i = ld.getText('text').toString().indexOf(needle);
        if (i < 0) throw new Error(`not in the text: ${needle}`);
        return i;
      };
      correctText(ld, at('lent me'), 0, 'kindly '); // at the start edge of S1: stays outside
      correctText(ld, at('me a spade'), 3); // inside S1
      correctText(ld, at('a plot') + 'a plot'.length, 0, ' too'); // at the end edge of S4: stays outside
      correctText(ld, at(' for the summer'), ' for the summer'.length); // all of S3
      correctText(ld, at('shed'), 0, 'tool '); // inside S5
      correctText(ld, at('Then the '), 'Then the '.length); // across the start edge of S2
      correctText(ld, at(' with the allotment'), ' with the allotment'.length); // all of S6

      const code = (layer: Y.Doc, textDoc: Y.Doc, codeId: string, words: string) => {
        const start = textDoc.getText('text').toString().indexOf(words);
        return addSegment(layer, textDoc, { codeId, start, end: start + words.length });
      };
      const ids = {
        s1: code(ruaLayer.doc, ruaText.doc, s.codes.tools, 'lent me a spade'),
        s2: code(ruaLayer.doc, ruaText.doc, s.codes.access, 'the committee gave us keys'),
        s3: code(ruaLayer.doc, ruaText.doc, s.codes.time, 'for the summer'),
        s4: code(boLayer.doc, boText.doc, s.codes.tools, 'a spade and a plot'),
        s5: code(boLayer.doc, boText.doc, s.codes.access, 'keys to the shed'),
        s6: code(boLayer.doc, boText.doc, s.codes.place, 'allotment'),
      };
      leadText.provider.connect();

      // Converged: every text replica equals the lead's, and the lead has received both layers
      // (the server commits before it relays, so what a client received is stored).
      const corrected = 'How did you start?\nMy neighbour kindly lent a spade and a plot too.\ncommittee gave us keys to the tool shed.';
      await until(
        () => [leadText, ruaText, boText].every((c) => c.doc.getText('text').toString() === corrected),
        'text replicas converged',
      );
      const leadRua = gcOffClient(server.url, lead.cookie, ruaLayerRoom);
      const leadBo = gcOffClient(server.url, lead.cookie, boLayerRoom);
      extra.push(leadRua, leadBo);
      await until(() => listSegments(leadRua.doc).length === 3 && listSegments(leadBo.doc).length === 3, 'lead received both layers');

      const res = await lead.call<SegmentOut[]>('GET', `/api/texts/${s.codingTextId}/segments`);
      expect(res.status).toBe(200);
      const byId = new Map(res.body.map((x) => [x.id, x]));
      expect(res.body).toHaveLength(6);

      // (a) Yjs's own resolution, one anchor at a time, on the lead's converged documents.
      const leadTextY = ld.getText('text');
      const resolveOne = (anchor: Uint8Array) =>
        Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(anchor), ld, false)!.index;
      for (const [layerDoc, coderId] of [
        [leadRua.doc, s.users.coder.id],
        [leadBo.doc, s.users.coder2.id],
      ] as const) {
        for (const seg of listSegments(layerDoc)) {
          const start = resolveOne(seg.start);
          const end = Math.max(start, resolveOne(seg.end));
          const got = byId.get(seg.id)!;
          expect(got, seg.id).toMatchObject({ coderId, codeId: seg.codeId, start, end, quote: leadTextY.toString().slice(start, end) });
        }
      }

      // (b) By hand: the original words minus the deleted ones, insertions at an edge left outside.
      const quotes = Object.fromEntries(Object.entries(ids).map(([k, id]) => [k, byId.get(id)!.quote]));
      expect(quotes).toEqual({
        s1: 'lent a spade',
        s2: 'committee gave us keys',
        s3: '',
        s4: 'a spade and a plot',
        s5: 'keys to the tool shed',
        s6: '',
      });
      // Fully deleted segments are kept and flagged, not dropped (DESIGN §2, §4).
      expect(byId.get(ids.s3)!.flags).toContain('orphaned');
      expect(byId.get(ids.s6)!.flags).toContain('orphaned');
      expect(byId.get(ids.s1)!.flags).toEqual([]);
      // Ordered by start.
      const starts = res.body.map((x) => x.start);
      expect(starts).toEqual([...starts].sort((a, b) => a - b));

      // A graceful stop flushes the projection: the table then holds the same quotes.
      for (const c of [...all, ...extra]) c.destroy();
      all.length = 0;
      extra.length = 0;
      await server.kill('SIGTERM');
      const rows = await server.withDb((d) => d.select().from(projectedSegments).where(eq(projectedSegments.textId, s.codingTextId)));
      expect(Object.fromEntries(rows.map((r) => [r.id, [r.quote, r.orphaned]]))).toEqual(
        Object.fromEntries(res.body.map((x) => [x.id, [x.quote, x.quote === '']])),
      );
      await server.restart();
    } finally {
      for (const c of [...all, ...extra]) c.destroy();
    }
  }, 120_000);

  it('refuses people outside the study and unknown texts', async () => {
    const outsider = await clientFor(server.url, 'outsider');
    expect((await outsider.call('GET', `/api/texts/${server.seeded.codingTextId}/segments`)).status).toBe(404);
    const lead = await clientFor(server.url, 'lead');
    expect((await lead.call('GET', `/api/texts/00000000-0000-4000-8000-000000000000/segments`)).status).toBe(404);
    expect((await lead.call('GET', `/api/texts/not-an-id/segments`)).status).toBe(404);
  }, 60_000);
});
