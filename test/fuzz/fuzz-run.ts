/**
 * The fuzz run (issue 13 item 10), shared by `pnpm fuzz` (long, test/fuzz/main.ts) and the short
 * seeded run in CI (fuzz.test.ts): hostile sockets send seeded hostile messages (hostile.ts) at a real
 * server while a well-behaved writer edits and a reader follows. Afterwards the reader must hold the
 * writer's document and see the writer's presence, and a newcomer must load the same document.
 */
import { randomUUID } from 'node:crypto';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import type { Db } from '@gloss/db';
import { admin } from '../../apps/server/src/index.js';
import { signIn, webSocketWithHeaders } from '../support/http.js';
import { waitFor } from '../support/wait.js';
import { hostileMessages, type HostileKind } from './hostile.js';

const PASSWORD = 'fuzz-password-1';

export interface FuzzWorld {
  writer: string;
  observer: string;
  coder: string;
  /** The writer's layer: the victim's room, readable (not writable) by the observer. */
  victimRoom: string;
  /** The coder's own layer: writable, so corrupt updates reach the update checks. */
  coderRoom: string;
  /** A layer in a study none of the attackers belongs to. */
  foreignRoom: string;
}

/** Seeds two studies: the victim's (writer owns, observer and coder are members) and a foreign one. */
export async function seedFuzzWorld(db: Db): Promise<FuzzWorld> {
  const user = (name: string) => admin.createUser(db, { email: `${name}-${randomUUID().slice(0, 8)}@example.test`, name, password: PASSWORD });
  const [writer, observer, coder, stranger] = await Promise.all([user('Writer'), user('Observer'), user('Coder'), user('Stranger')]);
  const study = await admin.createStudy(db, { title: 'Harbour interviews', createdBy: writer.id });
  await admin.addMember(db, study.id, observer.id, 'observer');
  await admin.addMember(db, study.id, coder.id, 'coder');
  const transcript = admin.transcriptFromPlainText('Interviewer: When did the ferry start running late?\n\nParticipant: The winter the pier was rebuilt.');
  const text = await admin.addTextFromTranscript(db, study.id, { title: 'Ferry', sourceFormat: 'txt', createdBy: writer.id, transcript });
  const foreign = await admin.createStudy(db, { title: 'Someone else’s study', createdBy: stranger.id });
  const foreignText = await admin.addTextFromTranscript(db, foreign.id, { title: 'Private', sourceFormat: 'txt', createdBy: stranger.id, transcript });
  return {
    writer: writer.email,
    observer: observer.email,
    coder: coder.email,
    victimRoom: await admin.ensureLayer(db, study.id, text.id, writer.id),
    coderRoom: await admin.ensureLayer(db, study.id, text.id, coder.id),
    foreignRoom: await admin.ensureLayer(db, foreign.id, foreignText.id, stranger.id),
  };
}

export interface FuzzOptions {
  url: string;
  world: FuzzWorld;
  seed: number;
  /** Hostile messages to send in all. */
  messages: number;
  /** Hostile sockets open at once. */
  concurrency?: number;
  /** Called now and then with the messages sent so far. */
  onProgress?: (sent: number) => void;
}

export interface FuzzReport {
  sent: number;
  byKind: Partial<Record<HostileKind, number>>;
  connections: number;
  /** Close codes the server answered the hostile sockets with (1006: none, the fuzzer closed it). */
  closeCodes: Record<string, number>;
  /** Upgrades to a room of a study the attacker is not in, and their HTTP answers. */
  refusedUpgrades: Record<string, number>;
  writerEdits: number;
  documentChars: number;
  durationMs: number;
}

interface Peer {
  doc: Y.Doc;
  provider: WebsocketProvider;
}

function peer(url: string, room: string, cookie: string): Peer {
  const doc = new Y.Doc();
  const provider = new WebsocketProvider(`${url.replace('http', 'ws')}/sync`, room, doc, {
    WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: url }) as never,
    disableBc: true,
    maxBackoffTime: 500,
  });
  return { doc, provider };
}

/** Sync step 1 with an empty state vector: the server always answers it with step 2 ([0, 1, …]). */
const PROBE = Uint8Array.from([0, 0, 1, 0]);

export async function runFuzz(o: FuzzOptions): Promise<FuzzReport> {
  const started = performance.now();
  const [writerCookie, readerCookie, observerCookie, coderCookie] = [
    await signIn(o.url, o.world.writer, PASSWORD),
    await signIn(o.url, o.world.writer, PASSWORD),
    await signIn(o.url, o.world.observer, PASSWORD),
    await signIn(o.url, o.world.coder, PASSWORD),
  ];
  const writer = peer(o.url, o.world.victimRoom, writerCookie);
  const reader = peer(o.url, o.world.victimRoom, readerCookie);
  writer.provider.awareness.setLocalStateField('user', { name: 'Writer', color: '#2a6f97' });
  await waitFor(() => writer.provider.synced && reader.provider.synced, 'well-behaved clients synced', 60_000);

  // The writer types steadily through the whole run.
  let writerEdits = 0;
  const probeText = writer.doc.getText('fuzz-probe');
  const typing = setInterval(() => {
    probeText.insert(probeText.length, `${writerEdits++ % 10}`);
  }, 20);

  const hostile = hostileMessages(o.seed, () => writer.doc.clientID);
  const report: FuzzReport = { sent: 0, byKind: {}, connections: 0, closeCodes: {}, refusedUpgrades: {}, writerEdits: 0, documentChars: 0, durationMs: 0 };
  const bump = (map: Record<string, number>, key: string) => (map[key] = (map[key] ?? 0) + 1);

  /** One hostile socket: a burst of messages and a probe, until the server answers the probe or closes. */
  async function attack(): Promise<void> {
    const roll = hostile.count(100);
    const [room, cookie] =
      roll <= 80 ? [o.world.victimRoom, observerCookie] : roll <= 95 ? [o.world.coderRoom, coderCookie] : [roll <= 98 ? o.world.foreignRoom : randomUUID(), observerCookie];
    const ws = new WebSocket(`${o.url.replace('http', 'ws')}/sync/${room}`, { headers: { cookie, origin: o.url } });
    report.connections++;
    ws.on('error', () => {});
    const outcome = await new Promise<'open' | number>((resolve) => {
      ws.once('unexpected-response', (_req, res) => resolve(res.statusCode ?? 0));
      ws.once('message', () => resolve('open')); // greeted: the room has loaded
      ws.once('close', () => resolve(0));
    });
    if (outcome !== 'open') {
      bump(report.refusedUpgrades, String(outcome));
      ws.terminate();
      return;
    }
    const closed = new Promise<number>((resolve) => ws.once('close', (code) => resolve(code)));
    const burst = hostile.count(20);
    for (let i = 0; i < burst && report.sent < o.messages && ws.readyState === ws.OPEN; i++) {
      const m = hostile.next();
      ws.send(m.data, { binary: typeof m.data !== 'string' });
      report.sent++;
      report.byKind[m.kind] = (report.byKind[m.kind] ?? 0) + 1;
      if (report.sent % 5_000 === 0) o.onProgress?.(report.sent);
    }
    let answered!: () => void;
    const probeAnswered = new Promise<void>((resolve) => (answered = resolve));
    ws.on('message', (data: Buffer) => {
      if (data[0] === 0 && data[1] === 1) answered();
    });
    if (ws.readyState === ws.OPEN) ws.send(PROBE);
    const code = await Promise.race([closed, probeAnswered.then(() => 1006)]);
    bump(report.closeCodes, String(code));
    ws.terminate();
  }

  try {
    await Promise.all(
      Array.from({ length: o.concurrency ?? 8 }, async () => {
        while (report.sent < o.messages) await attack();
      }),
    );
  } finally {
    clearInterval(typing);
  }

  // Correctness for the well-behaved: the reader converges on the writer's document and still sees its presence.
  const expected = () => Y.encodeStateVector(writer.doc).toString();
  await waitFor(() => Y.encodeStateVector(reader.doc).toString() === expected() && reader.doc.getText('fuzz-probe').toString() === probeText.toString(), 'reader converged on the writer', 60_000);
  writer.provider.awareness.setLocalStateField('user', { name: 'Writer', color: '#2a6f97', done: true });
  await waitFor(() => (reader.provider.awareness.getStates().get(writer.doc.clientID)?.user as { done?: boolean } | undefined)?.done === true, 'reader sees the writer’s own presence', 60_000);
  const newcomer = peer(o.url, o.world.victimRoom, await signIn(o.url, o.world.writer, PASSWORD));
  try {
    await waitFor(() => newcomer.provider.synced && newcomer.doc.getText('fuzz-probe').toString() === probeText.toString(), 'a newcomer loads the same document', 60_000);
  } finally {
    newcomer.provider.destroy();
    writer.provider.destroy();
    reader.provider.destroy();
  }
  report.writerEdits = writerEdits;
  report.documentChars = probeText.length;
  report.durationMs = Math.round(performance.now() - started);
  return report;
}
