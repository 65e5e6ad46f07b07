/**
 * Layer entries as the API lists them (GET /api/texts/:id, GET /api/rounds/:id): each readable layer
 * with its room, whose it is, its round (or null) and its kind (coder or consensus).
 */
import { documentAccess, type DocSupervision } from '../access/policy.js';
import type { DocRounds, RoundFacts } from '../access/rounds.js';
import type { Role } from '../sync/contracts.js';

export interface LayerDoc {
  id: string;
  coderId: string | null;
  roundId: string | null;
  coderName: string | null;
}

export interface LayerEntry {
  room: string;
  coderId: string | null;
  name: string;
  mine: boolean;
  canWrite: boolean;
  round: string | null;
  kind: 'coder' | 'consensus';
}

export const CONSENSUS_NAME = 'Consensus';

/**
 * The entries `userId` may open, in order: consensus first, then by name. `roundOf` gives the facts of
 * a layer's round (null for a layer outside rounds).
 */
export function layerEntries(
  docs: readonly LayerDoc[],
  role: Role,
  userId: string,
  openRound: RoundFacts | null,
  roundOf: (roundId: string) => RoundFacts | null,
  supervision: DocSupervision,
): LayerEntry[] {
  const out: LayerEntry[] = [];
  for (const d of docs) {
    const rounds: DocRounds = { openRound, layerRound: d.roundId ? roundOf(d.roundId) : null };
    const access = documentAccess(role, { id: d.id, kind: 'layer', coderId: d.coderId, roundId: d.roundId }, userId, rounds, supervision);
    if (!access.read) continue;
    out.push({
      room: d.id,
      coderId: d.coderId,
      name: d.coderId === null ? CONSENSUS_NAME : (d.coderName ?? ''),
      mine: d.coderId === userId,
      canWrite: access.write,
      round: d.roundId,
      kind: d.coderId === null ? 'consensus' : 'coder',
    });
  }
  return out.sort((a, b) => (a.kind === b.kind ? a.name.localeCompare(b.name) || (a.room < b.room ? -1 : 1) : a.kind === 'consensus' ? -1 : 1));
}
