/**
 * Small events of a study, live on every node: listeners on this node are called directly, and the
 * event goes through the relay (Redis pub/sub, or nothing on one node) to the others. Events name what
 * changed, never its words: a listener reads the data through the routes, which apply the reader's rights.
 * One channel per study and purpose (`<purpose>:<studyId>`); comments and study changes each use one.
 */
import type { Relay } from '../sync/contracts.js';

export interface StudyChannel<E extends { studyId: string }> {
  publish(event: E): Promise<void>;
  /** Calls `listener` for every event of the study, from this node or another; returns the unsubscribe. */
  listen(studyId: string, listener: (event: E) => void): Promise<() => Promise<void>>;
}

const encoder = new TextEncoder();
const decoder = new TextDecoder();

export function createStudyChannel<E extends { studyId: string }>(relay: Relay, purpose: string, onBadMessage: (err: unknown) => void = () => undefined): StudyChannel<E> {
  const channel = (studyId: string) => `${purpose}:${studyId}`;
  const listeners = new Map<string, Set<(event: E) => void>>();
  const deliver = (event: E) => {
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
            const event = JSON.parse(decoder.decode(payload)) as E;
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
