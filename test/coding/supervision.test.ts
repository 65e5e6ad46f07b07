/**
 * Supervision at the wire (issue 9), against a real server process once per database kind, with stock
 * y-websocket clients: a trainee lists, opens and receives only the texts assigned to them, by every
 * route and room; of others' layers on an assigned text only the reference, once the supervisor shares
 * the comparison; taking the assignment away closes the trainee's open sockets (live access). Review
 * states reach the trainee; only supervisors set them. Statuses: RFC 9110 (403 refused, 404 unknown or
 * hidden), RFC 6455 (101 handshake accepted, close code 1008 policy violation). The rules are the
 * project's own (issue 9, DESIGN §6 Access).
 */
import { addSegment } from '@gloss/model';
import { WebsocketProvider } from 'y-websocket';
import { WebSocket } from 'ws';
import * as Y from 'yjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { upgradeStatus, webSocketWithHeaders } from '../support/http.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

const POLICY_VIOLATION = 1008; // RFC 6455 §7.4.1

interface Layer {
  room: string;
  coderId: string | null;
  mine: boolean;
}
interface Assignment {
  textId: string;
  userId: string;
  reviewState: string;
  reviewNote: string;
  comparisonShared: boolean;
  reference: string | null;
}

/** A stock y-websocket client that records close events and does not retry a policy close. */
function watched(url: string, cookie: string, room: string) {
  const doc = new Y.Doc({ gc: false });
  const closes: number[] = [];
  const provider = new WebsocketProvider(`${url.replace(/^http/, 'ws')}/sync`, room, doc, {
    WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: url }) as never,
    disableBc: true,
    shouldReconnect: (event: CloseEvent) => event.code !== POLICY_VIOLATION,
  } as ConstructorParameters<typeof WebsocketProvider>[3]);
  provider.on('connection-close', (event) => {
    if (event) closes.push(event.code);
  });
  return { doc, provider, closes };
}

describe.each(dbKinds())('supervision of trainees at the wire on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding, startTimeoutMs: 240_000 });
  }, 300_000);
  afterAll(async () => server?.stop());

  it('a trainee cannot list, open or receive an unassigned text by any route or room; a shared reference opens; unassigning closes their sockets', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const coder = await clientFor(server.url, 'coder');
    const trainee = await clientFor(server.url, 'trainee');
    const unassigned = s.textId; // seedBasic's text: nobody assigned it to the trainee
    const assigned = s.codingTextId; // seedCoding assigns it to the trainee

    // The coder and the lead code the unassigned text, so there is something to leak.
    const coderLayer = (await coder.call<{ layers: Layer[] }>('GET', `/api/texts/${unassigned}`)).body.layers.find((l) => l.mine)!.room;
    const coderOnAssigned = (await coder.call<{ layers: Layer[] }>('GET', `/api/texts/${assigned}`)).body.layers.find((l) => l.mine)!.room;
    const writers = [gcOffClient(server.url, coder.cookie, s.textRoom), gcOffClient(server.url, coder.cookie, coderLayer), gcOffClient(server.url, coder.cookie, s.codingTextRoom), gcOffClient(server.url, coder.cookie, coderOnAssigned)];
    try {
      await until(() => writers.every((w) => w.provider.synced), 'coder synced');
      const [tText, tLayer, aText, aLayer] = writers as [(typeof writers)[0], (typeof writers)[0], (typeof writers)[0], (typeof writers)[0]];
      const words = 'neighbour lent me a spade';
      const at = tText.doc.getText('text').toString().indexOf(words);
      const segId = addSegment(tLayer.doc, tText.doc, { codeId: s.codes.tools, start: at, end: at + words.length });
      const at2 = aText.doc.getText('text').toString().indexOf('spade');
      addSegment(aLayer.doc, aText.doc, { codeId: s.codes.tools, start: at2, end: at2 + 5 });
      await until(async () => (await coder.call<unknown[]>('GET', `/api/texts/${unassigned}/segments`)).body.length === 1, 'coder segment stored');
      const thread = await lead.call<{ id: string }>('POST', `/api/texts/${unassigned}/comments`, { layer: coderLayer, segmentId: segId, body: 'Is a spade a tool here?' });
      expect(thread.status).toBe(201);

      // Lists: only the assigned text.
      const list = await trainee.call<Array<{ id: string }>>('GET', `/api/studies/${s.studyId}/texts`);
      expect(list.body.map((t) => t.id)).toEqual([assigned]);
      // Every route by text id answers as if the text did not exist (404), so ids are not probed.
      const byText = ['', '/segments', '/comments', `/comparison?layer=${coderLayer}&reference=${coderLayer}`, '/reference'];
      for (const path of byText) expect((await trainee.call('GET', `/api/texts/${unassigned}${path}`)).status, path).toBe(404);
      for (const room of [s.textRoom, coderLayer]) expect((await trainee.call('GET', `/api/documents/${room}/versions`)).status, `versions of ${room}`).not.toBe(200);
      // Study-wide routes carry nothing of it.
      // (Retrieval reads the projection, about a second behind: wait until the coder sees their segment there.)
      await until(async () => JSON.stringify((await coder.call('GET', `/api/studies/${s.studyId}/retrieval`)).body).includes(unassigned), 'segment projected');
      const retrieved = await trainee.call('GET', `/api/studies/${s.studyId}/retrieval`);
      expect(retrieved.status).toBe(200);
      expect(JSON.stringify(retrieved.body)).not.toContain(unassigned);
      const feedback = await trainee.call('GET', `/api/studies/${s.studyId}/feedback`);
      expect(JSON.stringify(feedback.body)).not.toContain('Is a spade a tool');
      // Rooms: refused at the upgrade (403), stock client too.
      expect(await upgradeStatus(server.url, s.textRoom, { origin: server.url, cookie: trainee.cookie })).toBe(403);
      expect(await upgradeStatus(server.url, coderLayer, { origin: server.url, cookie: trainee.cookie })).toBe(403);
      const stock = watched(server.url, trainee.cookie, s.textRoom);
      await until(() => stock.closes.length > 0, 'stock client refused');
      expect(stock.provider.synced).toBe(false);
      expect(stock.doc.getText('text').length).toBe(0);
      stock.provider.destroy();

      // On the assigned text: the text and their own layer, no one else's layer.
      const mine = await trainee.call<{ layers: Layer[] }>('GET', `/api/texts/${assigned}`);
      expect(mine.status).toBe(200);
      expect(mine.body.layers.map((l) => l.mine)).toEqual([true]);
      expect(await upgradeStatus(server.url, s.codingTextRoom, { origin: server.url, cookie: trainee.cookie })).toBe(101);
      expect(await upgradeStatus(server.url, coderOnAssigned, { origin: server.url, cookie: trainee.cookie })).toBe(403);

      // The lead makes the coder's layer the reference and shares the comparison: it opens, read-only.
      expect((await trainee.call('PUT', `/api/texts/${assigned}/reference`, { layer: coderOnAssigned })).status).toBe(403);
      expect((await lead.call('PUT', `/api/texts/${assigned}/reference`, { layer: coderOnAssigned })).status).toBe(200);
      expect(await upgradeStatus(server.url, coderOnAssigned, { origin: server.url, cookie: trainee.cookie })).toBe(403); // not shared yet
      const share = await lead.call<Assignment>('POST', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}/share`, { shared: true });
      expect([share.status, share.body.comparisonShared]).toEqual([200, true]);
      expect(await upgradeStatus(server.url, coderOnAssigned, { origin: server.url, cookie: trainee.cookie })).toBe(101);
      const traineeRoom = mine.body.layers[0]!.room;
      const cmp = await trainee.call<{ missed: unknown[] }>('GET', `/api/texts/${assigned}/comparison?layer=${traineeRoom}&reference=${coderOnAssigned}`);
      expect([cmp.status, cmp.body.missed.length]).toEqual([200, 1]); // the coder's "spade", nothing coded by the trainee

      // Review states: only supervisors set them; the trainee sees the state and the note.
      expect((await trainee.call('POST', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}/review`, { state: 'accepted' })).status).toBe(403);
      expect((await lead.call('POST', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}/review`, { state: 'returned', note: '' })).status).toBe(400);
      const returned = await lead.call<Assignment>('POST', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}/review`, { state: 'returned', note: 'Look again at the tools.' });
      expect(returned.status).toBe(200);
      const seen = await trainee.call<{ assignments: Assignment[] }>('GET', `/api/studies/${s.studyId}/assignments`);
      expect(seen.body.assignments.map((a) => [a.textId, a.reviewState, a.reviewNote])).toEqual([[assigned, 'returned', 'Look again at the tools.']]);

      // Open sockets follow: unsharing closes the reference socket; unassigning closes the text's.
      const onRef = watched(server.url, trainee.cookie, coderOnAssigned);
      const onText = watched(server.url, trainee.cookie, s.codingTextRoom);
      await until(() => onRef.provider.synced && onText.provider.synced, 'trainee synced');
      expect((await lead.call('POST', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}/share`, { shared: false })).status).toBe(200);
      await until(() => onRef.closes.includes(POLICY_VIOLATION), 'reference socket closed when unshared');
      expect(onText.closes).toEqual([]);
      expect((await lead.call('DELETE', `/api/studies/${s.studyId}/assignments/${assigned}/${s.users.trainee.id}`)).status).toBe(204);
      await until(() => onText.closes.includes(POLICY_VIOLATION), 'text socket closed when unassigned');
      expect((await trainee.call('GET', `/api/texts/${assigned}`)).status).toBe(404);
      expect((await trainee.call<unknown[]>('GET', `/api/studies/${s.studyId}/texts`)).body).toEqual([]);
      onRef.provider.destroy();
      onText.provider.destroy();

      // Assigning again restores it; the lead may assign to coders but not to observers.
      expect((await lead.call('POST', `/api/studies/${s.studyId}/assignments`, { textId: assigned, userId: s.users.trainee.id })).status).toBe(201);
      expect((await trainee.call('GET', `/api/texts/${assigned}`)).status).toBe(200);
      expect((await lead.call('POST', `/api/studies/${s.studyId}/assignments`, { textId: assigned, userId: s.users.coder.id })).status).toBe(201);
      expect((await lead.call('POST', `/api/studies/${s.studyId}/assignments`, { textId: assigned, userId: s.users.observer.id })).status).toBe(400);
      expect((await coder.call('POST', `/api/studies/${s.studyId}/assignments`, { textId: unassigned, userId: s.users.trainee.id })).status).toBe(403);

      // Everything above is scriptable and described (OpenAPI 3.1).
      const doc = (await lead.call<{ paths: Record<string, object> }>('GET', '/api/openapi.json')).body;
      for (const path of ['/api/studies/{studyId}/assignments', '/api/studies/{studyId}/assignments/{textId}/{userId}/review', '/api/studies/{studyId}/assignments/{textId}/{userId}/share', '/api/texts/{textId}/reference', '/api/texts/{textId}/comparison', '/api/studies/{studyId}/supervision/progress']) {
        expect(doc.paths, path).toHaveProperty([path]);
      }
    } finally {
      for (const w of writers) w.destroy();
    }
  }, 180_000);
});
