/** The room's lifecycle as a state machine (room-state.ts): only the drawn moves, and `settled` at the end. Common practice. */
import { describe, expect, it } from 'vitest';
import { RoomError, RoomStateError, RoomStateMachine, within, type RoomState } from './room-state.js';

const ALL: RoomState[] = ['loading', 'open', 'unloading', 'closed', 'failed'];
const ALLOWED = new Set(['loading>open', 'loading>failed', 'open>unloading', 'unloading>closed']);

/** A machine walked to `state` along the allowed moves. */
function at(state: RoomState): RoomStateMachine {
  const m = new RoomStateMachine();
  const path: Record<RoomState, RoomState[]> = { loading: [], open: ['open'], unloading: ['open', 'unloading'], closed: ['open', 'unloading', 'closed'], failed: ['failed'] };
  for (const s of path[state]) m.to(s);
  return m;
}

describe('RoomStateMachine', () => {
  it('starts loading and allows exactly the drawn moves', () => {
    expect(new RoomStateMachine().state).toBe('loading');
    for (const from of ALL) {
      for (const to of ALL) {
        const m = at(from);
        if (ALLOWED.has(`${from}>${to}`)) {
          m.to(to);
          expect(m.state).toBe(to);
        } else {
          expect(() => m.to(to), `${from} -> ${to}`).toThrow(RoomStateError);
          expect(m.state).toBe(from);
        }
      }
    }
  });

  it('settles on closed and on failed, not before', async () => {
    const events: string[] = [];
    const m = new RoomStateMachine();
    void m.settled.then(() => events.push(`settled in ${m.state}`));
    m.to('open');
    m.to('unloading');
    await Promise.resolve();
    expect(events).toEqual([]);
    expect(m.ended).toBe(false);
    m.to('closed');
    await m.settled;
    expect(events).toEqual(['settled in closed']);
    const failed = at('failed');
    expect(failed.ended).toBe(true);
    await failed.settled;
  });
});

describe('within', () => {
  it('passes a result through, and turns a promise that never settles into the given RoomError', async () => {
    await expect(within(Promise.resolve(7), 1_000, () => new RoomError('load-timeout', 'late'))).resolves.toBe(7);
    const never = new Promise<never>(() => {});
    const error = await within(never, 1, () => new RoomError('load-timeout', 'document did not load within 1 ms')).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(RoomError);
    expect((error as RoomError).code).toBe('load-timeout');
  });
});
