/**
 * Presence for someone coding a text independently in a round (issue 8): other people's states keep
 * only the fields that say who they are and where in the study they are (`user`, `where`); anything
 * that shows where in the text they point — the caret and selection, a hovered segment, any field
 * added later — is dropped. A whitelist, so a new pointing field cannot leak by default.
 */
import type { AwarenessEntry } from './awareness-table.js';

export const SHOWN_WHILE_INDEPENDENT = ['user', 'where'] as const;

export function withoutPointing(entries: readonly AwarenessEntry[], ownClientId: number | null): AwarenessEntry[] {
  return entries.map((e) => {
    if (e.clientId === ownClientId || e.state === 'null') return e;
    let parsed: unknown;
    try {
      parsed = JSON.parse(e.state);
    } catch {
      parsed = null; // states are checked as JSON on arrival; this cannot happen, and shows nothing if it does
    }
    const kept: Record<string, unknown> = {};
    if (parsed !== null && typeof parsed === 'object' && !Array.isArray(parsed)) {
      for (const k of SHOWN_WHILE_INDEPENDENT) if (k in parsed) kept[k] = (parsed as Record<string, unknown>)[k];
    }
    return { clientId: e.clientId, clock: e.clock, state: JSON.stringify(kept) };
  });
}
