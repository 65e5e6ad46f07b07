/**
 * Changes to a study made outside the documents' rooms that open screens should follow live: texts
 * added (an upload or an import) and an import's codes, segments and memos (analysis). Through the
 * relay, so every node's screens hear them (relay/study-channel.ts).
 */
import { createStudyChannel, type StudyChannel } from '../relay/study-channel.js';
import type { Relay } from '../sync/contracts.js';

export interface StudyEvent {
  action: 'texts-added' | 'imported';
  studyId: string;
  textIds: string[];
}

export type StudyEvents = StudyChannel<StudyEvent>;

export function createStudyEvents(relay: Relay, onBadMessage: (err: unknown) => void = () => undefined): StudyEvents {
  return createStudyChannel<StudyEvent>(relay, 'study', onBadMessage);
}
