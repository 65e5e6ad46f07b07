/**
 * Comment events of a study, live on every node: listeners on this node are called directly, and the
 * event goes through the relay (Redis pub/sub, or nothing on one node) to the others. Events name what
 * changed, never its words: a listener reads the comments through the routes, which apply the reader's
 * rights, and is told of a change only on a layer it may read (checked by the listener's owner).
 */
import type { Relay } from '../sync/contracts.js';

export interface CommentEvent {
  action: 'added' | 'resolved' | 'reopened';
  studyId: string;
  textId: string;
  layerDocId: string;
  threadId: string;
  commentId: string;
}

export interface CommentEvents {
  publish(event: CommentEvent): Promise<void>;
  /** Calls `listener` for every event of the study, from this node or another; returns the unsubscribe. */
  listen(studyId: string, listener: (event: CommentEvent) => void): Promise<() => Promise<void>>;
}

const channel = (studyId: string) => `comments:${studyId}`;
const encoder = new TextEncoder();
const decoder = new TextDecoder();

export function createCommentEvents(relay: Relay, onBadMessage: (err: unknown) => void = () => undefined): CommentEvents {
  const listeners = new Map<string, Set<(event: CommentEvent) => void>>();
  const deliver = (event: CommentEvent) => {
    for (const l of listeners.get(event.studyId) ?? []) l(event);
  };
  return {
    async publish(event) {
      deliver(event);
      await relay.publish(channel(event.studyId), encoder.encode(JSON.stringify(event)));
    },
    async listen(studyId, listener) {
      let set = listeners.get(studyId);
      if (!set) {
        listeners.set(studyId, (set = new Set()));
        await relay.subscribe(channel(studyId), (payload) => {
          try {
            const event = JSON.parse(decoder.decode(payload)) as CommentEvent;
            if (event.studyId === studyId) deliver(event);
          } catch (err) {
            onBadMessage(err);
          }
        });
      }
      set.add(listener);
      return async () => {
        const current = listeners.get(studyId);
        if (!current?.delete(listener) || current.size > 0) return;
        listeners.delete(studyId);
        await relay.unsubscribe(channel(studyId));
      };
    },
  };
}
