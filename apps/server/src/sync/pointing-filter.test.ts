import { describe, expect, it } from 'vitest';
import { withoutPointing } from './pointing-filter.js';

// The field names are the web app's (screens/coding/text-presence.ts: user, caret; study-context.ts: where).
describe('presence while coding independently', () => {
  it('keeps who and where, drops carets, selections and anything else; leaves removals and one’s own state alone', () => {
    const others = JSON.stringify({ user: { id: 'u2', name: 'Bo' }, where: { textId: 't1' }, caret: { a: 'AAE=', h: 'AAI=' }, hover: 's-1' });
    const mine = JSON.stringify({ user: { id: 'u1' }, caret: { a: 'x', h: 'y' } });
    const out = withoutPointing(
      [
        { clientId: 2, clock: 4, state: others },
        { clientId: 1, clock: 9, state: mine },
        { clientId: 3, clock: 2, state: 'null' },
        { clientId: 5, clock: 1, state: '[1,2]' },
      ],
      1,
    );
    expect(JSON.parse(out[0]!.state)).toEqual({ user: { id: 'u2', name: 'Bo' }, where: { textId: 't1' } });
    expect(out[0]!.clock).toBe(4);
    expect(out[1]!.state).toBe(mine);
    expect(out[2]!.state).toBe('null');
    expect(out[3]!.state).toBe('{}');
  });
});
