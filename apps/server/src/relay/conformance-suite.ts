/**
 * The relay's conformance suite: the cases every Relay passes, run against the in-memory one
 * (memory-relay.test.ts) and the Redis one (redis-relay.test.ts), two nodes each. What it holds a relay
 * to (sync/contracts.ts, Relay and RelaySubscription; Redis docs, "Pub/Sub": a message goes to every
 * subscriber of its channel):
 *   1. binary payloads reach the other node intact, never the sender's own node;
 *   2. after leaving, a subscriber hears nothing; subscribing again hears what follows;
 *   3. several subscribers of one room on one node each hear every message, and each leaves only its
 *      own subscription (a room whose load outlived its timeout leaving, with the newer room of its
 *      name subscribed, must not end the newer room's); leaving twice changes nothing;
 *   4. the last subscriber leaving and a new one subscribing right after (the leave not awaited)
 *      leaves the new one subscribed.
 * "Heard nothing" is checked without waiting on a clock: a later message from the same sender to the
 * same node arrives after it, so once that later one is seen, the earlier would have been seen too.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { waitFor } from '../../../../test/support/wait.js';
import type { Relay } from '../sync/contracts.js';

/** Two nodes joined by the relay under test. */
export interface RelaysUnderTest {
  one: Relay;
  two: Relay;
  close(): Promise<void>;
}

export function relayConformance(name: string, start: () => Promise<RelaysUnderTest>): void {
  describe(`${name}: relay conformance`, () => {
    let nodes: RelaysUnderTest;
    // Rooms unique to this run: a Redis may be shared with other suites.
    const prefix = `conformance-${Date.now()}-${Math.random().toString(36).slice(2)}`;
    let n = 0;
    const freshRoom = () => `${prefix}-${++n}`;

    beforeAll(async () => {
      nodes = await start();
    });
    afterAll(async () => {
      await nodes?.close();
    });

    it('delivers binary payloads intact to the other node, never to the sender’s own', async () => {
      const { one, two } = nodes;
      const room = freshRoom();
      const atOne: Uint8Array[] = [];
      const atTwo: Uint8Array[] = [];
      await one.subscribe(room, (p) => atOne.push(p.slice()));
      await two.subscribe(room, (p) => atTwo.push(p.slice()));
      const payload = new Uint8Array([0, 255, 13, 10, 0, 128]);
      await one.publish(room, payload);
      await two.publish(room, new Uint8Array([7]));
      await waitFor(() => atTwo.length === 1 && atOne.length === 1, 'one message each way');
      expect(atTwo[0]).toEqual(payload);
      expect(atOne[0]).toEqual(new Uint8Array([7]));
    });

    it('hears nothing after leaving, and what follows after subscribing again', async () => {
      const { one, two } = nodes;
      const room = freshRoom();
      const got: number[] = [];
      const first = await two.subscribe(room, (p) => got.push(p[0]!));
      await one.publish(room, new Uint8Array([1]));
      await waitFor(() => got.length === 1, 'message while subscribed');
      await first.unsubscribe();
      await one.publish(room, new Uint8Array([2])); // not heard
      await two.subscribe(room, (p) => got.push(p[0]!));
      await one.publish(room, new Uint8Array([3]));
      await waitFor(() => got.length === 2, 'message after subscribing again');
      expect(got).toEqual([1, 3]);
    });

    it('several subscribers of one room each hear every message, and each leaves only its own subscription', async () => {
      const { one, two } = nodes;
      const room = freshRoom();
      const stale: number[] = [];
      const newer: number[] = [];
      const staleOne = await two.subscribe(room, (p) => stale.push(p[0]!));
      const newerOne = await two.subscribe(room, (p) => newer.push(p[0]!));
      await one.publish(room, new Uint8Array([1]));
      await waitFor(() => stale.length === 1 && newer.length === 1, 'both subscribers heard it');
      await staleOne.unsubscribe();
      await one.publish(room, new Uint8Array([2]));
      await waitFor(() => newer.length === 2, 'the remaining subscriber still hears');
      await staleOne.unsubscribe(); // again: changes nothing
      await one.publish(room, new Uint8Array([3]));
      await waitFor(() => newer.length === 3, 'still subscribed after a second leave of the other');
      await newerOne.unsubscribe();
      await one.publish(room, new Uint8Array([4])); // heard by nobody
      const probe: number[] = [];
      await two.subscribe(room, (p) => probe.push(p[0]!));
      await one.publish(room, new Uint8Array([5]));
      await waitFor(() => probe.length === 1, 'a later subscriber hears the next message');
      expect({ stale, newer, probe }).toEqual({ stale: [1], newer: [1, 2, 3], probe: [5] });
    });

    it('a subscriber arriving while the last one leaves stays subscribed', async () => {
      const { one, two } = nodes;
      const room = freshRoom();
      const got: number[] = [];
      const last = await two.subscribe(room, () => {});
      const leaving = last.unsubscribe(); // not awaited: the new subscriber comes in meanwhile
      await two.subscribe(room, (p) => got.push(p[0]!));
      await leaving;
      await one.publish(room, new Uint8Array([6]));
      await waitFor(() => got.length === 1, 'the new subscriber hears');
      expect(got).toEqual([6]);
    });
  });
}
