import { describe, expect, it } from 'vitest';
import { diffRuns } from './diff-runs.js';

describe('word-diff runs for the versions screen', () => {
  it('shows a replaced word as removed then added, keeping the words around it (Myers 1986 minimal edit)', () => {
    expect(diffRuns('the ferry left at six', 'the ferry left at seven today')).toEqual([
      { kind: 'same', text: 'the ferry left at' },
      { kind: 'removed', text: 'six' },
      { kind: 'added', text: 'seven today' },
    ]);
  });

  it('reads the old text from same+removed runs and the new text from same+added runs', () => {
    const a = 'My uncle taught me rope splicing on the north quay';
    const b = 'My aunt taught me splicing on the quay in winter';
    const runs = diffRuns(a, b);
    expect(runs.filter((r) => r.kind !== 'added').map((r) => r.text).join(' ')).toBe(a);
    expect(runs.filter((r) => r.kind !== 'removed').map((r) => r.text).join(' ')).toBe(b);
    expect(diffRuns(a, a)).toEqual([{ kind: 'same', text: a }]);
  });
});
