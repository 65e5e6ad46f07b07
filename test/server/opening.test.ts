/**
 * The opening request (`GET /api/texts/:id/opening`, issue 11 item 1) against a real server process:
 * it carries exactly the rooms the sync upgrade lets the same person open, for every role,
 * before and during a round's independent phase (then a participant gets no one else's layer, and none
 * of the words planted in others' segments is anywhere in the answer's bytes); it is compressed when the
 * client accepts brotli or gzip (RFC 9110 §8.4 Content-Encoding, RFC 7932 brotli, RFC 1952 gzip); its
 * states are whole documents; and its ticket opens the page's rooms at the upgrade only for the same
 * session, only rooms it names, and not after an access change (a member removed): then the upgrade
 * decides afresh and refuses. Statuses: RFC 6455 (101), RFC 9110 (403). Expected behaviour: the
 * project's own rules (DESIGN §2 and §6, issue 8 items 2 and 3).
 */
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import type { Db } from '@gloss/db';
import { decodeOpening, encodeStateVectors, listSegments, type Opening } from '@gloss/model';
import { upgradeStatus } from '../support/http.js';
import type { Person } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { markersIn } from '../rounds/frames.js';
import { clientsFor, seedRoundsWithCoder2Base, startRoundOfThree, type Client, type Coder2Seed, type RoundOut } from '../rounds/support.js';

const kind = process.env.DATABASE_URL ? 'postgres' : 'pglite';
const marker = `mk-opening-coder2-${randomBytes(4).toString('hex')}`;

type Seed = Coder2Seed;
const seed = (db: Db) => seedRoundsWithCoder2Base(db, marker);

describe(`the opening request (${kind})`, () => {
  let server: SpawnedServer<Seed>;
  let s: Seed;
  let as: Record<Person, Client>;
  let roundId: string | null = null;
  /** The state vectors of the coder's whole states before the round (a device's copies), and those states. */
  let held: Map<string, Uint8Array> | undefined;
  let before: Opening | undefined;

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed, startTimeoutMs: 240_000 });
    s = server.seeded;
    as = await clientsFor(server.url);
  }, 300_000);
  afterAll(async () => {
    await server?.stop();
  }, 120_000);

  async function opening(who: Person, encoding = 'br, gzip', held?: Map<string, Uint8Array>): Promise<{ status: number; contentEncoding: string | null; opening?: Opening; bytes: Uint8Array }> {
    // fetch (undici) undoes the content coding it accepted, as a browser does
    const sv = held ? `?sv=${Buffer.from(encodeStateVectors(held)).toString('base64url')}` : '';
    const res = await fetch(`${server.url}/api/texts/${s.codingTextId}/opening${sv}`, { headers: { cookie: as[who].cookie, origin: server.url, 'accept-encoding': encoding } });
    const bytes = new Uint8Array(await res.arrayBuffer());
    return { status: res.status, contentEncoding: res.headers.get('content-encoding'), bytes, ...(res.status === 200 ? { opening: decodeOpening(bytes) } : {}) };
  }
  /**
   * Every layer of the coding text with its coder, as the people who can see them list them (each lists
   * at least their own: GET /api/texts/:id and the round's detail), and the text's, codebook's and memos' rooms.
   */
  async function candidates(): Promise<{ rooms: string[]; layers: Map<string, string | null> }> {
    const layers = new Map<string, string | null>([[s.coderBaseLayer, s.users.coder.id], [s.coder2BaseLayer, s.users.coder2.id]]);
    for (const who of ['owner', 'lead', 'coder', 'coder2', 'trainee', 'observer'] as const) {
      const t = await as[who].call<{ layers?: Array<{ room: string; coderId: string | null }> }>('GET', `/api/texts/${s.codingTextId}`);
      for (const l of t.body.layers ?? []) layers.set(l.room, l.coderId);
      if (!roundId) continue;
      const r = await as[who].call<RoundOut>('GET', `/api/rounds/${roundId}`);
      for (const l of r.body.texts?.flatMap((x) => x.layers) ?? []) layers.set(l.room, l.coderId);
    }
    return { rooms: [s.codingTextRoom, s.codebookRoom, s.memosRoom, ...layers.keys()], layers };
  }
  const upgrade = (who: Person, room: string, ticket?: string) => upgradeStatus(server.url, ticket ? `${room}?ticket=${ticket}` : room, { origin: server.url, cookie: as[who].cookie });

  /** For each person: the rooms of their opening are exactly the candidates their upgrade accepts. */
  async function sameAsUpgrade(phase: string): Promise<Record<string, string[]>> {
    const { rooms } = await candidates();
    const out: Record<string, string[]> = {};
    for (const who of ['owner', 'lead', 'coder', 'coder2', 'trainee', 'observer'] as const) {
      const o = await opening(who);
      if (o.status !== 200) {
        // a text the person may not read at all: 404, and the upgrade refuses its room too
        expect(o.status, `${who} (${phase})`).toBe(404);
        expect(await upgrade(who, s.codingTextRoom), `${who}'s upgrade to the text (${phase})`).not.toBe(101);
        out[who] = [];
        continue;
      }
      const given = o.opening!.docs.map((d) => d.room).sort();
      const accepted: string[] = [];
      for (const room of rooms) if ((await upgrade(who, room)) === 101) accepted.push(room);
      // no closed round here, so every room the upgrade accepts is on the text's page, and nothing else
      expect(given, `${who}'s opening against their upgrades (${phase})`).toEqual(accepted.sort());
      out[who] = given;
    }
    return out;
  }

  it('outside rounds: every person gets the rooms their upgrade accepts, as whole states, compressed', async () => {
    const byPerson = await sameAsUpgrade('no round');
    // a coder reads the others' layers outside rounds: coder2's segment is in the coder's opening
    expect(byPerson.coder).toEqual(expect.arrayContaining([s.codingTextRoom, s.codebookRoom, s.memosRoom, s.coderBaseLayer, s.coder2BaseLayer]));
    const o = await opening('coder');
    const layer = new Y.Doc({ gc: false });
    Y.applyUpdate(layer, o.opening!.docs.find((d) => d.room === s.coder2BaseLayer)!.state);
    expect(listSegments(layer).map((x) => x.note)).toContain(marker);
    const text = new Y.Doc({ gc: false });
    Y.applyUpdate(text, o.opening!.docs.find((d) => d.room === s.codingTextRoom)!.state);
    expect(text.getText('text').toString()).toContain('keys to the shed');
    expect(o.opening!.ticket).toMatch(/^[A-Za-z0-9_-]{43}$/);
    // the content coding the client asked for (RFC 9110 §12.5.3), none when it takes none
    expect(o.contentEncoding).toBe('br');
    expect((await opening('coder', 'gzip')).contentEncoding).toBe('gzip');
    const plain = await opening('coder', 'identity');
    expect(plain.contentEncoding).toBeNull();
    expect(plain.opening!.docs.map((d) => d.room)).toEqual(o.opening!.docs.map((d) => d.room));
    // an outsider and a signed-out caller learn nothing
    expect((await opening('outsider')).status).toBe(404);
    expect((await fetch(`${server.url}/api/texts/${s.codingTextId}/opening`)).status).toBe(401);
  }, 240_000);

  it('with the state vectors of the device’s copies: the same rooms, each as what it gained since (nothing when unchanged)', async () => {
    before = (await opening('coder')).opening!;
    held = new Map(before.docs.map((d) => [d.room, Y.encodeStateVectorFromUpdate(d.state)]));
    // a room this person is not given stays out whatever the device claims to hold of it
    const stranger = '6f1c1d2e-0000-4000-8000-000000000000';
    const o = await opening('coder', 'br, gzip', new Map([...held, [stranger, new Uint8Array([0])]]));
    expect(o.status).toBe(200);
    expect(o.bytes[0], 'version 2 (model opening.ts)').toBe(2);
    expect(o.opening!.docs.map((d) => d.room)).toEqual(before.docs.map((d) => d.room));
    for (const d of o.opening!.docs) {
      const whole = before.docs.find((b) => b.room === d.room)!;
      // the server's state vector is that of the whole state it holds
      expect(Y.decodeStateVector(d.stateVector!), d.kind).toEqual(Y.decodeStateVector(Y.encodeStateVectorFromUpdate(whole.state)));
      if (d.kind === 'memos') {
        // filtered for one view: always whole
        expect(d.diff).toBe(false);
        expect(d.state).toEqual(whole.state);
        continue;
      }
      // nothing changed since: no new item, at most the delete set
      expect(d.diff, d.kind).toBe(true);
      expect(Y.decodeUpdate(d.state).structs, d.kind).toEqual([]);
    }
    // a room the device has nothing of comes whole
    const fresh = await opening('coder', 'identity', new Map([[s.coder2BaseLayer, new Uint8Array([0])]]));
    expect(fresh.opening!.docs.find((d) => d.room === s.coder2BaseLayer)!.state).toEqual(before.docs.find((d) => d.room === s.coder2BaseLayer)!.state);
    expect(fresh.opening!.docs.find((d) => d.room === s.codingTextRoom)!.diff).toBe(false);
    // an sv that is not state vectors by room is the request's fault
    const bad = await fetch(`${server.url}/api/texts/${s.codingTextId}/opening?sv=AAAA_w`, { headers: { cookie: as.coder.cookie, origin: server.url } });
    expect(bad.status).toBe(400);
    // the parameter changes nothing for those with no access
    expect((await opening('outsider', 'br', held)).status).toBe(404);
  }, 240_000);

  it('independent phase: a participant gets their own round layer and no one else’s layer or words', async () => {
    const res = await startRoundOfThree(s, as.lead, 'Opening round');
    expect(res.status).toBe(201);
    roundId = res.body.id;
    const round = (await as.coder.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    const ownRoundLayer = round.texts[0]!.layers.find((l) => l.mine)!.room;
    const byPerson = await sameAsUpgrade('independent');
    const { layers: coderOf } = await candidates();
    for (const who of ['coder', 'coder2', 'lead'] as const) {
      const layers = (await opening(who)).opening!.docs.filter((d) => d.kind === 'layer').map((d) => d.room);
      // only their own layers (round and outside), never another participant's or the others' base layers
      const others = [...coderOf].filter(([, coder]) => coder !== s.users[who].id).map(([room]) => room);
      expect(layers.filter((l) => others.includes(l)), `${who}: others' layers`).toEqual([]);
    }
    expect(byPerson.coder).toContain(ownRoundLayer);
    expect(byPerson.coder).not.toContain(s.coder2BaseLayer);
    // the words of coder2's segment are nowhere in the coder's answer, compressed or not
    expect(markersIn((await opening('coder', 'identity')).bytes, [marker])).toEqual([]);
    expect(markersIn((await opening('coder')).bytes, [marker])).toEqual([]);
    // with the state vectors of copies taken before the round: coder2's layer is not given again
    const withVectors = await opening('coder', 'identity', held);
    const since = withVectors.opening!;
    expect(since.docs.map((d) => d.room)).not.toContain(s.coder2BaseLayer);
    expect(markersIn(withVectors.bytes, [marker])).toEqual([]);
    expect(since.docs.map((d) => d.room).sort()).toEqual(byPerson.coder!.slice().sort());
  }, 240_000);

  it('the ticket opens the named rooms for the same session only, and not after an access change', async () => {
    const mine = (await opening('coder2')).opening!;
    const theirs = (await opening('coder')).opening!;
    const roomOfCoder = theirs.docs.find((d) => d.kind === 'layer' && !mine.docs.some((m) => m.room === d.room))!.room;
    // the named rooms open with the ticket (also in another casing)
    expect(await upgrade('coder2', s.codingTextRoom, mine.ticket)).toBe(101);
    expect(await upgrade('coder2', s.codingTextRoom.toUpperCase(), mine.ticket)).toBe(101);
    // a room the ticket does not name is decided afresh, and refused
    expect(await upgrade('coder2', roomOfCoder, mine.ticket)).toBe(403);
    // another person's ticket does nothing for this session: decided afresh, refused
    expect(await upgrade('coder2', roomOfCoder, theirs.ticket)).toBe(403);
    // a made-up ticket changes nothing either
    expect(await upgrade('coder2', s.codingTextRoom, randomBytes(32).toString('base64url'))).toBe(101);
    // coder2 is removed from the study: the same ticket, presented with the still-valid session, no longer stands
    const removed = await as.owner.call('DELETE', `/api/studies/${s.studyId}/members/${s.users.coder2.id}`);
    expect(removed.status).toBe(204);
    expect(await upgrade('coder2', s.codingTextRoom, mine.ticket)).toBe(403);
    expect(await upgrade('coder', s.codingTextRoom, theirs.ticket)).toBe(101);
  }, 240_000);

  it('a copy from before the round catches up from what changed since (the reveal stamps the codebook)', async () => {
    expect((await as.lead.call('POST', `/api/rounds/${roundId}/reveal`)).status).toBe(200);
    const since = (await opening('coder', 'identity', held)).opening!;
    const now = (await opening('coder', 'identity')).opening!;
    expect(since.docs.map((d) => d.room)).toEqual(now.docs.map((d) => d.room));
    const gained: string[] = [];
    for (const d of since.docs.filter((x) => x.diff)) {
      const copy = new Y.Doc({ gc: false });
      Y.applyUpdate(copy, before!.docs.find((b) => b.room === d.room)!.state);
      if (Y.decodeUpdate(d.state).structs.length > 0) gained.push(d.kind);
      Y.applyUpdate(copy, d.state);
      const server = new Y.Doc({ gc: false });
      Y.applyUpdate(server, now.docs.find((b) => b.room === d.room)!.state);
      // the copy holds what the server holds, and the state vector sent says so
      expect(Y.encodeStateAsUpdate(copy, Y.encodeStateVector(server)).byteLength, d.kind).toBe(Y.encodeStateAsUpdate(server, Y.encodeStateVector(server)).byteLength);
      expect(Y.decodeStateVector(Y.encodeStateVector(copy)), d.kind).toEqual(Y.decodeStateVector(Y.encodeStateVector(server)));
      expect(Y.decodeStateVector(d.stateVector!), d.kind).toEqual(Y.decodeStateVector(Y.encodeStateVector(server)));
      expect(JSON.stringify(copy.toJSON()), d.kind).toBe(JSON.stringify(server.toJSON()));
    }
    // the reveal's stamp is the codebook's change since (rounds.ts advance)
    expect(gained).toContain('codebook');
  }, 240_000);
});
