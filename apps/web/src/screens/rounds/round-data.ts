/** The round a screen shows, refetched on demand and (while coders work) every few seconds; the study's members. */
import { createEffect, createResource, createSignal, onCleanup, untrack, type Accessor, type Resource } from 'solid-js';
import { roundsApi, type Round } from '../../api/rounds.js';
import type { Member } from '../../api/types.js';
import { api } from '../../api/client.js';

/** Who steers a round, as the server says (owner and leads); this only hides buttons, the server decides. */
export function leadsRound(round: Round): boolean {
  return round.me.canManage;
}

export interface RoundSource {
  round: Accessor<Round | undefined>;
  /** The last refusal or failure, in the server's words (cleared by the next good answer). */
  error: Accessor<unknown>;
  loading: Accessor<boolean>;
  refetch: () => void;
}

/**
 * The round, fetched at once and then every `pollMs` (the progress board and the phase follow the
 * others' work). A failed poll keeps the last good answer on screen and shows why it failed.
 */
export function useRound(roundId: () => string, pollMs = 0): RoundSource {
  const [round, setRound] = createSignal<Round>();
  const [error, setError] = createSignal<unknown>();
  const [loading, setLoading] = createSignal(true);
  let inFlight = false;
  let alive = true;
  const fetchNow = () => {
    if (inFlight) return;
    inFlight = true;
    const id = untrack(roundId);
    roundsApi.get(id).then(
      (r) => { if (alive && id === untrack(roundId)) { setRound(r); setError(undefined); } },
      (err: unknown) => { if (alive) setError(err); },
    ).finally(() => {
      inFlight = false;
      if (alive) setLoading(false);
    });
  };
  createEffect(() => {
    roundId();
    setRound(undefined);
    setLoading(true);
    untrack(fetchNow);
  });
  if (pollMs > 0) {
    const timer = setInterval(fetchNow, pollMs);
    onCleanup(() => clearInterval(timer));
  }
  onCleanup(() => (alive = false));
  return { round, error, loading, refetch: fetchNow };
}

export function useMembers(studyId: () => string): Resource<Member[]> {
  const [members] = createResource(studyId, (id) => api.members(id));
  return members;
}

export const PHASE_WORDS: Record<Round['phase'], string> = {
  independent: 'Independent coding',
  revealed: 'Revealed: walk-through and consensus',
  closed: 'Closed',
};
