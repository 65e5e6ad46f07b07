/**
 * Comment events of a study, live on every node (relay/study-channel.ts). Events name what changed,
 * never its words, and a listener is told of a change only on a layer it may read (checked by the
 * listener's owner, the SSE route).
 */
import { createStudyChannel, type StudyChannel } from '../relay/study-channel.js';
import type { Relay } from '../sync/contracts.js';

export interface CommentEvent {
  action: 'added' | 'resolved' | 'reopened';
  studyId: string;
  textId: string;
  layerDocId: string;
  threadId: string;
  commentId: string;
}

export type CommentEvents = StudyChannel<CommentEvent>;

export function createCommentEvents(relay: Relay, onBadMessage: (err: unknown) => void = () => undefined): CommentEvents {
  return createStudyChannel<CommentEvent>(relay, 'comments', onBadMessage);
}
