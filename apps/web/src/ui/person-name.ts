/**
 * A person's name from the study's members, never their id: "…" while the list is loading, and words
 * for someone who has since left the study (their memos and changes stay).
 */
import type { Member } from '../api/types.js';

export function personName(members: readonly Member[] | undefined, id: string): string {
  if (!members) return '…';
  return members.find((m) => m.userId === id)?.name ?? 'someone no longer in the study';
}
