/**
 * Shared pieces of the calibration-round tests: the coding seed with one segment the coder made in
 * their own layer before any round, signed-in clients for every person, and a round body.
 */
import type { Db } from '@gloss/db';
import { addSegment, newLayerDoc } from '@gloss/model';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { appendUpdate, clientFor, loadStoredDoc, seedCoding, type CodingSeed } from '../coding/support.js';
import type { ApiClient } from '../support/http.js';
import { PEOPLE, type Person } from '../support/seed.js';

export interface RoundSeed extends CodingSeed {
  /** The coder's layer outside rounds on the coding text, holding one segment coded before any round. */
  coderBaseLayer: string;
}

export async function seedRounds(db: Db): Promise<RoundSeed> {
  const s = await seedCoding(db);
  const text = await loadStoredDoc(db, s.codingTextRoom);
  const layer = newLayerDoc();
  const words = 'lent me a spade';
  const start = text.getText('text').toString().indexOf(words);
  // createdAt 1000 ms: long before any round (the model places a segment in a round by time).
  addSegment(layer, text, { codeId: s.codes.tools, start, end: start + words.length }, () => 1000);
  const coderBaseLayer = await ensureLayer(db, s.studyId, s.codingTextId, s.users.coder.id);
  await appendUpdate(db, coderBaseLayer, layer);
  return { ...s, coderBaseLayer };
}

export interface Coder2Seed extends RoundSeed {
  /** coder2's layer outside rounds on the coding text, holding one segment whose note is the marker given. */
  coder2BaseLayer: string;
  base2SegId: string;
}

/** The round seed plus a layer of coder2's outside rounds on the coding text, holding a marked segment. */
export async function seedRoundsWithCoder2Base(db: Db, note: string): Promise<Coder2Seed> {
  const s = await seedRounds(db);
  const text = await loadStoredDoc(db, s.codingTextRoom);
  const layer = newLayerDoc();
  const words = 'keys to the shed';
  const at = text.getText('text').toString().indexOf(words);
  const base2SegId = addSegment(layer, text, { codeId: s.codes.access, start: at, end: at + words.length, note }, () => 1000);
  const coder2BaseLayer = await ensureLayer(db, s.studyId, s.codingTextId, s.users.coder2.id);
  await appendUpdate(db, coder2BaseLayer, layer);
  return { ...s, coder2BaseLayer, base2SegId };
}

export type Client = ApiClient & { cookie: string };
export const EVERYONE = Object.keys(PEOPLE) as Person[];

export async function clientsFor(url: string): Promise<Record<Person, Client>> {
  const entries = await Promise.all(EVERYONE.map(async (p) => [p, await clientFor(url, p)] as const));
  return Object.fromEntries(entries) as Record<Person, Client>;
}

export interface RoundOut {
  id: string;
  number: number;
  phase: 'independent' | 'revealed' | 'closed';
  codebookVersionId: string | null;
  participants: Array<{ id: string; name: string }>;
  texts: Array<{ id: string; title: string; room: string; layers: LayerOut[] }>;
  me: { participant: boolean; canManage: boolean; done: string[] };
}
export interface LayerOut {
  room: string;
  coderId: string | null;
  name: string;
  mine: boolean;
  canWrite: boolean;
  round: string | null;
  kind: 'coder' | 'consensus';
}

/** The lead starts a round on the coding text with the coder, coder2 and the lead taking part. */
export function startRoundOfThree(s: RoundSeed, lead: Client, name: string) {
  return lead.call<RoundOut>('POST', `/api/studies/${s.studyId}/rounds`, {
    name,
    textIds: [s.codingTextId],
    participantIds: [s.users.coder.id, s.users.coder2.id, s.users.lead.id],
    unit: 'sentence',
    statistic: 'krippendorff-alpha',
  });
}
