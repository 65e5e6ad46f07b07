/**
 * Small events of a study, live on every node: listeners on this node are called directly, and the
 * event goes through the relay (Redis pub/sub, or nothing on one node) to the others. Events name what
 * changed, never its words: a listener reads the data through the routes, which apply the reader's rights.
 * One channel per study and purpose (`<purpose>:<studyId>`); comments and study changes each use one.
 */
import type { Relay, RelaySubscription } from '../sync/contracts.js';

export interface StudyChannel<E extends { studyId: string }> {
  publish(event: E): Promise<void>;
  /** Calls `listener` for every event of the study, from this node or another; returns the unsubscribe. */
  listen(studyId: string, listener: (event: E) => void): Promise<() => Promise<void>>;
}

const encoder = new TextEncoder();
const decoder = new TextDecoder();

/** A study's listeners on this node, and the one relay subscription they share. */
interface Listened<E> {
  listeners: Set<(event: E) => void>;
  subscription: Promise<RelaySubscription>;
}

export function createStudyChannel<E extends { studyId: string }>(relay: Relay, purpose: string, onBadMessage: (err: unknown) => void = () => undefined): StudyChannel<E> {
  const channel = (studyId: string) => `${purpose}:${studyId}`;
  const studies = new Map<string, Listened<E>>();
  const deliver = (event: E) => {
    for (const l of studies.get(event.studyId)?.listeners ?? []) l(event);
  };
  return {
    async publish(event) {
      deliver(event);
      await relay.publish(channel(event.studyId), encoder.encode(JSON.stringify(event)));
    },
    async listen(studyId, listener) {
      let study = studies.get(studyId);
      if (study === undefined) {
        const subscription = relay.subscribe(channel(studyId), (payload) => {
          try {
            const event = JSON.parse(decoder.decode(payload)) as E;
            if (event.studyId === studyId) deliver(event);
          } catch (err) {
            onBadMessage(err);
          }
        });
        studies.set(studyId, (study = { listeners: new Set(), subscription }));
      }
      const joined = study;
      joined.listeners.add(listener);
      try {
        await joined.subscription;
      } catch (error) {
        joined.listeners.delete(listener);
        if (joined.listeners.size === 0 && studies.get(studyId) === joined) studies.delete(studyId);
        throw error;
      }
      return async () => {
        if (!joined.listeners.delete(listener) || joined.listeners.size > 0) return;
        if (studies.get(studyId) === joined) studies.delete(studyId);
        await (await joined.subscription).unsubscribe();
      };
    },
  };
}
