/**
 * Follow mode for a walk-through: the lead's place (round, text, the place's number and its extent as
 * encoded Yjs RelativePositions, so it stays on the same words while the text changes) travels in the
 * study's presence (the codebook room's awareness, field `walk`). Everyone else's view follows it
 * unless they left follow mode; leaving is remembered per round for this tab.
 */
import { createEffect, createSignal, onCleanup, untrack, type Accessor } from 'solid-js';
import * as Y from 'yjs';
import { fromBase64, toBase64 } from 'lib0/buffer';
import type { StudyScope } from '../study/study-context.js';

export interface WalkPlace {
  roundId: string;
  textId: string;
  /** 0-based number of the place in the walk-through, and how many there are. */
  index: number;
  count: number;
  start: string;
  end: string;
}

export interface LeadPlace extends WalkPlace {
  byId: string;
  byName: string;
}

const [leftRounds, setLeftRounds] = createSignal<ReadonlySet<string>>(new Set());

export function encodePlace(text: Y.Doc, start: number, end: number): { start: string; end: string } {
  const yt = text.getText('text');
  const enc = (i: number, assoc: number) => toBase64(Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(yt, Math.min(i, yt.length), assoc)));
  return { start: enc(start, 0), end: enc(end, -1) };
}

/** The place's extent in this copy of the text, or null when it cannot be placed (yet). */
export function decodePlace(text: Y.Doc, p: Pick<WalkPlace, 'start' | 'end'>): { start: number; end: number } | null {
  try {
    const a = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(fromBase64(p.start)), text, false);
    const b = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(fromBase64(p.end)), text, false);
    return a && b ? { start: a.index, end: Math.max(a.index, b.index) } : null;
  } catch {
    return null; // a malformed place from a peer is not followed
  }
}

export interface Follow {
  /** The lead's place in this round, if the lead is walking through it now. */
  leadPlace: Accessor<LeadPlace | undefined>;
  following: Accessor<boolean>;
  setFollowing(on: boolean): void;
  /** The lead announces a place (null: the walk-through stopped). */
  publish(p: WalkPlace | null): void;
}

export function useFollow(scope: StudyScope, roundId: () => string, leadId: () => string | null): Follow {
  const [leadPlace, setLeadPlace] = createSignal<LeadPlace | undefined>();
  const read = () => {
    const aw = scope.codebook()?.provider.awareness;
    if (!aw) return;
    // the round's lead if they are walking through it; otherwise whoever else steers it (an owner, say)
    let found: LeadPlace | undefined;
    aw.getStates().forEach((st, clientId) => {
      if (clientId === aw.clientID) return;
      const w = st.walk as WalkPlace | null | undefined;
      const u = st.user as { id?: string; name?: string } | undefined;
      if (!w || w.roundId !== roundId() || !u?.id || typeof w.textId !== 'string') return;
      if (found && found.byId === leadId()) return;
      found = { ...w, byId: u.id, byName: u.name ?? '' };
    });
    setLeadPlace((old) => (old && found && JSON.stringify(old) === JSON.stringify(found) ? old : found));
  };
  // the codebook may open after this screen does: attach to its awareness whenever it is there
  createEffect(() => {
    const aw = scope.codebook()?.provider.awareness;
    if (!aw) return;
    aw.on('change', read);
    untrack(read);
    onCleanup(() => aw.off('change', read));
  });
  return {
    leadPlace,
    following: () => !leftRounds().has(roundId()),
    setFollowing(on) {
      const next = new Set(leftRounds());
      if (on) next.delete(roundId());
      else next.add(roundId());
      setLeftRounds(next);
    },
    publish(p) {
      scope.codebook()?.provider.awareness.setLocalStateField('walk', p);
    },
  };
}
