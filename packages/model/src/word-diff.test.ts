import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { diffWords } from './word-diff.js';

function apply(oldWords: string[], newWords: string[], changes: ReturnType<typeof diffWords>): { kept: string[]; rebuilt: string[] } {
  const removed = new Set<number>();
  const added = new Set<number>();
  for (const c of changes) c.words.forEach((_, i) => (c.kind === 'removed' ? removed : added).add(c.at + i));
  return { kept: oldWords.filter((_, i) => !removed.has(i)), rebuilt: newWords.filter((_, i) => !added.has(i)) };
}

describe('diffWords (Myers 1986)', () => {
  it('finds the shortest edit script of the paper\'s example: abcabba -> cbabac has D = 5', () => {
    // Myers, "An O(ND) Difference Algorithm and Its Variations" (1986), Fig. 1: D = 5, LCS length 4.
    const changes = diffWords('a b c a b b a', 'c b a b a c');
    const total = changes.reduce((n, c) => n + c.words.length, 0);
    expect(total).toBe(5);
    const { kept, rebuilt } = apply('a b c a b b a'.split(' '), 'c b a b a c'.split(' '), changes);
    expect(kept).toEqual(rebuilt);
    expect(kept).toHaveLength(4);
  });

  it('reports a correction as the words removed and added', () => {
    expect(diffWords('we moved to the cost in May', 'we moved to the coast in May')).toEqual([
      { kind: 'removed', words: ['cost'], at: 4 },
      { kind: 'added', words: ['coast'], at: 4 },
    ]);
  });

  it('keeps a common subsequence of both word lists (random)', () => {
    const words = fc.array(fc.constantFrom('a', 'b', 'c', 'd'), { maxLength: 30 });
    fc.assert(
      fc.property(words, words, (a, b) => {
        const changes = diffWords(a.join(' '), b.join(' '));
        const { kept, rebuilt } = apply(a, b, changes);
        expect(kept).toEqual(rebuilt);
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 300) },
    );
  });
});
