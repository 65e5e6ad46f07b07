/** One node: nothing to fan out to. */
import type { Relay } from '../sync/contracts.js';

export function noRelay(): Relay {
  return {
    subscribe: async () => {},
    unsubscribe: async () => {},
    publish: async () => {},
    close: async () => {},
  };
}
