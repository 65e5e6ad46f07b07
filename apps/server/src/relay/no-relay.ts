/** One node: nothing to fan out to (a node alone on an in-memory hub). */
import type { Relay } from '../sync/contracts.js';
import { createMemoryRelayHub } from './memory-relay.js';

export function noRelay(): Relay {
  return createMemoryRelayHub().node();
}
