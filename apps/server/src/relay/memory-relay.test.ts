/** The in-memory relay (two nodes on one hub) against the relay conformance suite, and noRelay alone. */
import { describe, expect, it } from 'vitest';
import { relayConformance } from './conformance-suite.js';
import { createMemoryRelayHub } from './memory-relay.js';
import { noRelay } from './no-relay.js';

relayConformance('in-memory relay', async () => {
  const hub = createMemoryRelayHub();
  const one = hub.node();
  const two = hub.node();
  return { one, two, close: async () => void (await Promise.all([one.close(), two.close()])) };
});

describe('noRelay', () => {
  it('is one node alone: subscribing, publishing and leaving resolve, and it never hears itself', async () => {
    const relay = noRelay();
    const got: Uint8Array[] = [];
    const subscription = await relay.subscribe('room', (p) => got.push(p));
    await relay.publish('room', new Uint8Array([1]));
    await subscription.unsubscribe();
    await subscription.unsubscribe();
    await relay.close();
    expect(got).toEqual([]); // publish delivers synchronously (memory-relay.ts), so nothing is still on its way
    expect(relay.lossy).toBeFalsy();
  });
});
