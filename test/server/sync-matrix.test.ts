/**
 * The authorisation matrix for sync (issue 13 item 7): every person (anonymous, each study role, a
 * member of another study, and a participant of a round in its independent phase) × every kind of room
 * (a text, a text in an open round, the codebook, the memos, a coder's layer, a participant's round
 * layer, and after the reveal the round's consensus layer) × every message type of the y-websocket protocol (y-protocols
 * 1.0.7: sync step 1, sync step 2, update, awareness, query-awareness, auth). Zero unauthorised
 * successes: a room someone may not read refuses the upgrade itself (401 without a session, 403/404
 * otherwise), and a write by someone who may not write it in full is answered with permission-denied
 * and is absent from the server's state (asked with a sync step 1 on the same connection: the server
 * handles a connection's messages in order). The expectations are written by hand from DESIGN §6 and
 * access/policy.ts (the one role table), like route-rights.ts for HTTP. Sessions: a signed-out or
 * password-changed session is refused at the upgrade.
 */
import * as encoding from 'lib0/encoding';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import * as awarenessProtocol from 'y-protocols/awareness';
import { apiClient, signIn, upgradeStatus } from '../support/http.js';
import { PASSWORD, PEOPLE, type Person } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { frame, isSyncStep2, kindOf, MESSAGE_AUTH, MESSAGE_AWARENESS, MESSAGE_QUERY_AWARENESS, MESSAGE_SYNC, openProbe, syncStep1, type Probe } from '../support/sync-probe.js';
import { seedRounds, type RoundSeed } from '../rounds/support.js';
import type { RoundOut } from '../rounds/support.js';

type Who = 'anonymous' | Exclude<Person, 'coder2'> | 'participant';
type Room = 'text' | 'roundText' | 'codebook' | 'memos' | 'coderLayer' | 'participantRoundLayer';
/** none: the upgrade is refused; read: writes refused; rule: only some writes (checked per update; a write outside them is refused); write: any write. */
type Access = 'none' | 'read' | 'rule' | 'write';

const WHO: Who[] = ['anonymous', 'owner', 'lead', 'coder', 'trainee', 'observer', 'outsider', 'participant'];
/** The participant of the open round is coder2; the trainee takes part in the same round. */
const PERSON: Record<Exclude<Who, 'anonymous'>, Person> = { owner: 'owner', lead: 'lead', coder: 'coder', trainee: 'trainee', observer: 'observer', outsider: 'outsider', participant: 'coder2' };

// prettier-ignore
const EXPECTED: Record<Room, Record<Who, Access>> = {
  // The first text: in no round, not assigned to the trainee (a trainee reads assigned texts only).
  text:                  { anonymous: 'none', owner: 'write', lead: 'write', coder: 'read', trainee: 'none', observer: 'read', outsider: 'none', participant: 'read' },
  // The round's text: read by every member it is assigned to; corrected by owner and lead.
  roundText:             { anonymous: 'none', owner: 'write', lead: 'write', coder: 'read', trainee: 'read', observer: 'read', outsider: 'none', participant: 'read' },
  // Coders and trainees only propose codes; observers read.
  codebook:              { anonymous: 'none', owner: 'write', lead: 'write', coder: 'rule', trainee: 'rule', observer: 'read', outsider: 'none', participant: 'rule' },
  // Everyone writes only their own memos; observers read.
  memos:                 { anonymous: 'none', owner: 'rule', lead: 'rule', coder: 'rule', trainee: 'rule', observer: 'read', outsider: 'none', participant: 'rule' },
  // The coder's own layer on the round's text, outside the round: participants coding it independently may not read it.
  coderLayer:            { anonymous: 'none', owner: 'read', lead: 'read', coder: 'write', trainee: 'none', observer: 'read', outsider: 'none', participant: 'none' },
  // A participant's round layer in the independent phase: theirs alone.
  participantRoundLayer: { anonymous: 'none', owner: 'none', lead: 'none', coder: 'none', trainee: 'none', observer: 'none', outsider: 'none', participant: 'write' },
};

const payloadMessage = (type: number, step: number, update: Uint8Array) =>
  frame((e) => {
    encoding.writeVarUint(e, type);
    encoding.writeVarUint(e, step);
    encoding.writeVarUint8Array(e, update);
  });

function markerUpdate(marker: string): Uint8Array {
  const d = new Y.Doc();
  d.getMap('matrix').set(marker, marker);
  return Y.encodeStateAsUpdate(d);
}

/** The server's whole state of the room, asked on the probe's own connection (answered after everything sent before). */
async function serverState(probe: Probe): Promise<Y.Doc> {
  const from = probe.received.length;
  probe.send(syncStep1());
  const step2 = await probe.next(isSyncStep2, from);
  const doc = new Y.Doc();
  // sync step 2: [0, 1, update]
  const { readSyncMessage } = await import('y-protocols/sync');
  const { createDecoder, readVarUint } = await import('lib0/decoding');
  const dec = createDecoder(step2);
  readVarUint(dec);
  readSyncMessage(dec, encoding.createEncoder(), doc, 'server');
  return doc;
}

describe('sync authorisation matrix', () => {
  let server: SpawnedServer<RoundSeed>;
  const cookies = {} as Record<Person, string>;
  const rooms = {} as Record<Room, string>;
  let roundId = '';

  beforeAll(async () => {
    server = await spawnServer({ db: 'pglite', seed: seedRounds, startTimeoutMs: 180_000 });
    const s = server.seeded;
    for (const p of Object.keys(PEOPLE) as Person[]) cookies[p] = await signIn(server.url, PEOPLE[p].email, PASSWORD);
    // The outsider is a member of another study: their own.
    expect((await apiClient(server.url, cookies.outsider).call('POST', '/api/studies', { title: 'Another study' })).status).toBe(201);
    const round = await apiClient(server.url, cookies.lead).call<RoundOut>('POST', `/api/studies/${s.studyId}/rounds`, {
      name: 'Matrix round',
      textIds: [s.codingTextId],
      participantIds: [s.users.coder2.id, s.users.trainee.id],
      unit: 'turn',
      statistic: 'krippendorff-alpha',
      purpose: 'Every message type against every role.',
    });
    expect(round.status).toBe(201);
    roundId = round.body.id;
    const mine = (await apiClient(server.url, cookies.coder2).call<RoundOut>('GET', `/api/rounds/${round.body.id}`)).body.texts[0]!.layers;
    Object.assign(rooms, {
      text: s.textRoom,
      roundText: s.codingTextRoom,
      codebook: s.codebookRoom,
      memos: s.memosRoom,
      coderLayer: s.coderBaseLayer,
      participantRoundLayer: mine.find((l) => l.coderId === s.users.coder2.id)!.room,
    });
  }, 300_000);
  afterAll(async () => server?.stop());

  /**
   * Every cell of `table`: the upgrade, then each message type, as described at the top. Then, per room
   * someone may write in full, a last accepted write, and once it is held, none of the refused ones is.
   */
  async function checkTable<R extends string>(table: Record<R, Record<Who, Access>>, roomOf: (room: R) => string) {
    const unauthorised: string[] = [];
    const wrongRefusal: string[] = [];
    const denied: string[] = [];
    /** Markers of refused writes, per room: checked again at the end, once a later accepted write is held. */
    const refusedMarkers = new Map<R, string[]>();
    for (const room of Object.keys(table) as R[]) {
      const roomId = roomOf(room);
      for (const who of WHO) {
        const access = table[room][who];
        const cell = `${who} on ${room}`;
        const cookie = who === 'anonymous' ? undefined : cookies[PERSON[who]];
        if (access === 'none') {
          const status = await upgradeStatus(server.url, roomId, { origin: server.url, ...(cookie ? { cookie } : {}) });
          if (status === 101) unauthorised.push(`${cell}: upgrade accepted`);
          else if (who === 'anonymous' ? status !== 401 : status !== 403 && status !== 404) wrongRefusal.push(`${cell}: ${status}`);
          continue;
        }
        const probe = await openProbe(server.url, roomId, cookie!);
        try {
          // sync step 1: reading is allowed here, so it is answered with step 2.
          const before = await serverState(probe);
          expect(before).toBeInstanceOf(Y.Doc);
          // query-awareness and auth: answered or ignored, never a close.
          probe.send(frame((e) => encoding.writeVarUint(e, MESSAGE_QUERY_AWARENESS)));
          probe.send(frame((e) => (encoding.writeVarUint(e, MESSAGE_AUTH), encoding.writeVarUint(e, 0), encoding.writeVarString(e, 'let me in'))));
          // awareness: presence is part of reading (a reader is seen where they read).
          const aw = new awarenessProtocol.Awareness(new Y.Doc());
          aw.setLocalState({ user: { name: who } });
          probe.send(frame((e) => (encoding.writeVarUint(e, MESSAGE_AWARENESS), encoding.writeVarUint8Array(e, awarenessProtocol.encodeAwarenessUpdate(aw, [aw.clientID])))));
          aw.destroy();
          // Writes: as an update and as a sync step 2, each with its own marker.
          for (const [step, label] of [[2, 'update'], [1, 'step2']] as const) {
            const marker = `m${markerCount++}-${who}-${room}-${label}`;
            const from = probe.received.length;
            probe.send(payloadMessage(MESSAGE_SYNC, step, markerUpdate(marker)));
            const holds = async () => (await serverState(probe)).getMap('matrix').get(marker) === marker;
            if (access === 'write') {
              // An accepted update joins the room once it is stored (group commit): wait for it.
              const held = await waitFor(holds, `${cell}: ${label} held`).then(() => true, () => false);
              const refusal = probe.received.slice(from).some((m) => kindOf(m).type === MESSAGE_AUTH);
              if (!held || refusal) wrongRefusal.push(`${cell}: a ${label} by someone who may write was ${refusal ? 'refused' : 'not held'}`);
            } else {
              // A refusal is sent instead of storing (sync/connection.ts), before the step 2 asked next.
              const held = await holds();
              const refusal = probe.received.slice(from).some((m) => kindOf(m).type === MESSAGE_AUTH);
              refusedMarkers.set(room, [...(refusedMarkers.get(room) ?? []), marker]);
              if (held) unauthorised.push(`${cell}: ${label} held by the server`);
              if (!refusal) wrongRefusal.push(`${cell}: ${label} refused without a permission-denied message`);
              else denied.push(cell);
            }
          }
          expect(probe.ws.readyState, `${cell}: the connection stays open`).toBe(probe.ws.OPEN);
        } finally {
          probe.close();
        }
      }
    }
    for (const room of Object.keys(table) as R[]) {
      const writer = WHO.find((w) => table[room][w] === 'write') as Exclude<Who, 'anonymous'> | undefined;
      if (!writer) continue;
      const probe = await openProbe(server.url, roomOf(room), cookies[PERSON[writer]]);
      try {
        const last = `last-${room}`;
        probe.send(payloadMessage(MESSAGE_SYNC, 2, markerUpdate(last)));
        await waitFor(async () => (await serverState(probe)).getMap('matrix').get(last) === last, `${room}: the last write held`);
        const state = (await serverState(probe)).getMap('matrix');
        for (const marker of refusedMarkers.get(room) ?? []) if (state.has(marker)) unauthorised.push(`${room}: refused write ${marker} held after all`);
      } finally {
        probe.close();
      }
    }
    return { unauthorised, wrongRefusal, denied };
  }
  let markerCount = 0;

  it('gives no one more than the table allows, for every message type', async () => {
    const { unauthorised, wrongRefusal, denied } = await checkTable(EXPECTED, (room) => rooms[room]);
    expect(unauthorised, 'unauthorised successes').toEqual([]);
    expect(wrongRefusal, 'cells that did not behave as the table says').toEqual([]);
    expect(denied.length).toBeGreaterThan(0);
  }, 300_000);

  // After the main table, because it moves the round on. After the reveal, the round's consensus layer
  // (DESIGN §6) is read by whoever reads others' layers (not a trainee without a shared comparison) and
  // written by lead and owner only. Before the reveal it is not listed to anyone (rounds/layer-entries.ts) and refused at
  // the upgrade (test/rounds/lifecycle.test.ts).
  it('after the reveal, the consensus layer: every message type against every role', async () => {
    const lead = apiClient(server.url, cookies.lead);
    expect((await lead.call('POST', `/api/rounds/${roundId}/reveal`)).status).toBe(200);
    const revealed = (await lead.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    const consensusRoom = revealed.texts[0]!.layers.find((l) => l.kind === 'consensus')!.room;
    // prettier-ignore
    const table = {
      consensusLayer: { anonymous: 'none', owner: 'write', lead: 'write', coder: 'read', trainee: 'none', observer: 'read', outsider: 'none', participant: 'read' },
    } satisfies Record<string, Record<Who, Access>>;
    const { unauthorised, wrongRefusal, denied } = await checkTable(table, () => consensusRoom);
    expect(unauthorised, 'unauthorised successes').toEqual([]);
    expect(wrongRefusal, 'cells that did not behave as the table says').toEqual([]);
    expect(denied.length).toBeGreaterThan(0);
  }, 300_000);

  // Last: it ends the observer's sessions and changes their password.
  it('refuses the upgrade for a signed-out session and for one ended by a password change', async () => {
    const { url, seeded } = server;
    const out = await signIn(url, PEOPLE.observer.email, PASSWORD);
    expect(await upgradeStatus(url, seeded.textRoom, { origin: url, cookie: out })).toBe(101);
    expect((await apiClient(url, out).call('DELETE', '/api/session')).status).toBe(204);
    expect(await upgradeStatus(url, seeded.textRoom, { origin: url, cookie: out })).toBe(401);

    const other = await signIn(url, PEOPLE.observer.email, PASSWORD);
    const here = await signIn(url, PEOPLE.observer.email, PASSWORD);
    expect((await apiClient(url, here).call('PUT', '/api/me/password', { currentPassword: PASSWORD, newPassword: 'sol-new-password-2' })).status).toBeLessThan(300);
    expect(await upgradeStatus(url, seeded.textRoom, { origin: url, cookie: other })).toBe(401);
  }, 60_000);
});
