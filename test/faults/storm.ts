/**
 * A storm of stock y-websocket clients writing unique tokens into one memos room, and a ledger of
 * those tokens: who wrote each, and which clients received it from the server (a remote update can
 * only reach a client after the server committed it: DESIGN.md §6, commit before relay). The fault
 * tests use the ledger to prove that nothing anyone received is lost, whatever was killed.
 */
import { addMemo } from '@gloss/model';
import * as Y from 'yjs';
import type { BasicSeed, Person } from '../support/seed.js';
import { cookieFor, remoteClient } from '../sync/support/remote.js';

/** Members who may write memos of their own (the observer may not; the outsider is no member). */
export const WRITERS = ['owner', 'lead', 'coder', 'coder2', 'trainee'] as const satisfies readonly Person[];

export type StormClient = ReturnType<typeof remoteClient> & {
  index: number;
  /** Times the provider reached "connected" (the first connect included). */
  connects: number;
  /** Times its socket closed. */
  closes: number;
};

/** Memo titles in a document: the tokens it holds. */
export function tokensIn(doc: Y.Doc): Set<string> {
  const out = new Set<string>();
  doc.getMap('memos').forEach((m) => {
    if (m instanceof Y.Map) out.add(String(m.get('title')));
  });
  return out;
}

export class Ledger {
  readonly written = new Map<string, number>();
  /** token -> clients that received it from the server */
  readonly received = new Map<string, Set<number>>();
  /** Deliveries in all (a token received by 49 clients counts 49). */
  deliveries = 0;

  watch(client: StormClient): void {
    client.doc.getMap('memos').observe((event) => {
      if (event.transaction.local) return;
      for (const key of event.keysChanged) {
        const memo = client.doc.getMap('memos').get(key);
        if (!(memo instanceof Y.Map)) continue;
        const token = String(memo.get('title'));
        const who = this.received.get(token) ?? new Set<number>();
        if (!who.has(client.index)) {
          who.add(client.index);
          this.deliveries++;
        }
        this.received.set(token, who);
      }
    });
  }

  /** Tokens someone other than their writer has received, now. */
  seen(): Set<string> {
    return new Set(this.received.keys());
  }
}

/**
 * `count` clients; client i connects to `baseUrlOf(i)`. Sessions live in the shared database, so one
 * sign-in per person at `signInUrl` serves every node.
 */
export async function openStorm(signInUrl: string, baseUrlOf: (i: number) => string, seed: BasicSeed, count: number, ledger: Ledger): Promise<StormClient[]> {
  const cookies = new Map<string, string>();
  for (const person of WRITERS) cookies.set(person, await cookieFor(signInUrl, person));
  const clients: StormClient[] = [];
  for (let i = 0; i < count; i++) {
    const person = WRITERS[i % WRITERS.length]!;
    const client = Object.assign(remoteClient(baseUrlOf(i), cookies.get(person)!, seed.memosRoom), { index: i, connects: 0, closes: 0 });
    client.provider.on('status', ({ status }: { status: string }) => {
      if (status === 'connected') client.connects++;
    });
    client.provider.on('connection-close', () => {
      client.closes++;
    });
    ledger.watch(client);
    clients.push(client);
  }
  return clients;
}

/** Client i writes one token (a jotting of its person's own, titled with the token). */
export function writeToken(client: StormClient, seed: BasicSeed, token: string, ledger: Ledger): void {
  const person = WRITERS[client.index % WRITERS.length]!;
  addMemo(client.doc, { kind: 'jotting', author: seed.users[person].id, title: token, attachedTo: { kind: 'study' } });
  ledger.written.set(token, client.index);
}

/** Yields to the event loop for a while between rounds of writes (pacing load, not waiting for a result). */
export const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** True when every client holds every written token. */
export function converged(clients: StormClient[], ledger: Ledger): boolean {
  return clients.every((c) => {
    const held = c.doc.getMap('memos');
    if (held.size < ledger.written.size) return false;
    const tokens = tokensIn(c.doc);
    for (const t of ledger.written.keys()) if (!tokens.has(t)) return false;
    return true;
  });
}
