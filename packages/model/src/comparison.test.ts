/**
 * Layer against reference on hand-built cases whose results were worked out by hand (the categories
 * are common practice in supervised coding review; their exact boundaries are defined in comparison.ts).
 * Text: an invented interview, two speaker turns joined by a line break as the text document does.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compareLayers, ComparisonInputError, wordSpans, wordsBetween, type ComparedSegment } from './comparison.js';

const TEXT = 'Interviewer: Why did you join the cinema crew?\nMarit: My neighbour asked me, and the hall felt warm on winter evenings.';
const at = (words: string, from = 0) => {
  const start = TEXT.indexOf(words, from);
  if (start < 0) throw new Error(`not in text: ${words}`);
  return { start, end: start + words.length };
};
const seg = (id: string, codeId: string, words: string, from = 0): ComparedSegment => ({ id, codeId, ...at(words, from) });

describe('wordsBetween', () => {
  const words = wordSpans(TEXT);
  it('counts the words with a character between two positions, in either order', () => {
    const a = at('My neighbour asked');
    expect(wordsBetween(words, a.start, a.start)).toBe(0);
    expect(wordsBetween(words, a.start, at('asked').start)).toBe(2); // "My", "neighbour"
    expect(wordsBetween(words, at('asked').start, a.start)).toBe(2);
    // Only a space and a comma between: no word.
    expect(wordsBetween(words, at('me,').start + 2, at('and the').start)).toBe(0);
    // Inside one word: that word counts once.
    expect(wordsBetween(words, at('neighbour').start + 1, at('neighbour').start + 4)).toBe(1);
  });
});

describe('compareLayers', () => {
  it('sorts each reference segment into matched, other boundary, other code or missed, and the rest of the layer into extra', () => {
    const reference = [
      seg('r1', 'belonging', 'My neighbour asked me'), // layer has the same code, one word shorter at the end: within 1 word
      seg('r2', 'warmth', 'the hall felt warm on winter evenings'), // layer has the same code on three words only: 2 words off each end
      seg('r3', 'motive', 'Why did you join the cinema crew?'), // layer gave another code there
      seg('r4', 'place', 'cinema crew'), // nested in r3; layer has nothing of "place" but its "recruited" overlaps: other code
      seg('r5', 'season', 'winter evenings'), // the layer's "warmth" ends at "on": nothing overlaps, missed
    ];
    const layer = [
      seg('t1', 'belonging', 'My neighbour asked'),
      seg('t2', 'warmth', 'felt warm on'),
      seg('t3', 'recruited', 'join the cinema crew'),
      seg('t4', 'belonging', 'Interviewer'), // nothing in the reference there: extra
    ];
    const tolerance1 = compareLayers(TEXT, layer, reference, 1);
    expect(tolerance1.counts.belonging).toMatchObject({ matched: 1, extra: 1 });
    expect(tolerance1.otherBoundary.map((e) => e.reference!.id)).toEqual(['r2']);
    expect(tolerance1.otherBoundary[0]).toMatchObject({ startShiftWords: 2, endShiftWords: 2, codeIds: ['warmth'], quote: 'the hall felt warm on winter evenings' });
    expect(tolerance1.otherCode.map((e) => [e.reference!.id, e.codeIds])).toEqual([
      ['r3', ['motive', 'recruited']],
      ['r4', ['place', 'recruited']],
    ]);
    expect(tolerance1.missed.map((e) => [e.reference!.id, e.quote])).toEqual([['r5', 'winter evenings']]);
    expect(tolerance1.extra.map((e) => e.layer[0]!.id)).toEqual(['t4']);

    // With no tolerance, r1's one-word shorter end is a boundary difference too.
    const strict = compareLayers(TEXT, layer, reference, 0);
    expect(strict.otherBoundary.map((e) => e.reference!.id)).toEqual(['r1', 'r2']);
    // With a generous tolerance, both match.
    expect(compareLayers(TEXT, layer, reference, 5).otherBoundary).toEqual([]);
  });

  it('reports missed and extra when nothing overlaps, and a segment across two turns like any other', () => {
    const across = seg('r1', 'motive', 'crew?\nMarit: My');
    const reference = [across, seg('r2', 'warmth', 'warm')];
    const layer = [seg('t1', 'season', 'winter'), seg('t2', 'motive', 'crew?\nMarit: My neighbour')];
    const c = compareLayers(TEXT, layer, reference, 0);
    expect(c.missed.map((e) => [e.reference!.id, e.quote])).toEqual([['r2', 'warm']]);
    expect(c.extra.map((e) => [e.layer[0]!.id, e.quote])).toEqual([['t1', 'winter']]);
    // The layer's end runs one word further ("neighbour") than the reference's.
    expect(c.otherBoundary).toHaveLength(1);
    expect(c.otherBoundary[0]).toMatchObject({ startShiftWords: 0, endShiftWords: 1, quote: 'crew?\nMarit: My neighbour' });
  });

  it('takes the same-code segment sharing most characters as the match, and lists other overlapping codes as extra', () => {
    const reference = [seg('r1', 'warmth', 'the hall felt warm')];
    const layer = [seg('t1', 'warmth', 'hall'), seg('t2', 'warmth', 'the hall felt warm'), seg('t3', 'season', 'felt warm')];
    const c = compareLayers(TEXT, layer, reference, 0);
    expect(c.counts.warmth).toMatchObject({ matched: 1 });
    expect(c.otherBoundary).toEqual([]);
    // t1 overlaps a reference segment of its code: not extra. t3's code is not the reference's there.
    expect(c.extra.map((e) => e.layer[0]!.id)).toEqual(['t3']);
  });

  it('nested both ways: a same-code layer segment inside the reference is a boundary question; a reference segment inside another code is other code', () => {
    // Worked by hand: "the hall felt warm on winter evenings" against "felt warm" — the start lies two
    // words in ("the hall"), the end three words short ("on winter evenings").
    const reference = [seg('r1', 'warmth', 'the hall felt warm on winter evenings'), seg('r2', 'season', 'winter')];
    const layer = [seg('t1', 'warmth', 'felt warm'), seg('t2', 'place', 'on winter evenings')];
    const c = compareLayers(TEXT, layer, reference, 2);
    expect(c.otherBoundary.map((e) => [e.reference!.id, e.startShiftWords, e.endShiftWords])).toEqual([['r1', 2, 3]]);
    expect(c.otherCode.map((e) => [e.reference!.id, e.codeIds])).toEqual([['r2', ['season', 'place']]]);
    // t2 is already listed under other code (for r2), so it is not extra too; nothing is missed.
    expect([c.extra, c.missed]).toEqual([[], []]);
    // A tolerance of three words takes the nested segment as the match.
    expect(compareLayers(TEXT, layer, reference, 3).counts.warmth).toMatchObject({ matched: 1, otherBoundary: 0 });
  });

  it('leaves collapsed segments out and refuses places outside the text', () => {
    const point = { id: 'p', codeId: 'warmth', start: 5, end: 5 };
    expect(compareLayers(TEXT, [point], [point], 0)).toMatchObject({ missed: [], extra: [], otherCode: [], otherBoundary: [] });
    expect(() => compareLayers(TEXT, [{ id: 'x', codeId: 'c', start: 0, end: TEXT.length + 1 }], [], 0)).toThrow(ComparisonInputError);
    expect(() => compareLayers(TEXT, [], [], -1)).toThrow(ComparisonInputError);
  });

  it('properties: against itself nothing differs; every segment is accounted for exactly once', () => {
    const segArb = fc
      .record({ a: fc.nat({ max: TEXT.length }), b: fc.nat({ max: TEXT.length }), code: fc.constantFrom('a', 'b', 'c') })
      .map(({ a, b, code }) => ({ start: Math.min(a, b), end: Math.max(a, b), codeId: code }));
    fc.assert(
      fc.property(fc.array(segArb, { maxLength: 12 }), fc.array(segArb, { maxLength: 12 }), fc.nat({ max: 3 }), (xs, ys, tol) => {
        const layer = xs.map((s, i) => ({ ...s, id: `t${i}` }));
        const reference = ys.map((s, i) => ({ ...s, id: `r${i}` }));
        const self = compareLayers(TEXT, reference, reference, tol);
        expect(self.missed.length + self.extra.length + self.otherCode.length + self.otherBoundary.length).toBe(0);

        const c = compareLayers(TEXT, layer, reference, tol);
        const refIds = [...c.missed, ...c.otherCode, ...c.otherBoundary].map((e) => e.reference!.id);
        const matched = Object.values(c.counts).reduce((n, k) => n + k.matched, 0);
        expect(new Set(refIds).size).toBe(refIds.length);
        expect(refIds.length + matched).toBe(reference.filter((s) => s.end > s.start).length);
        for (const e of c.extra) expect(c.otherCode.some((o) => o.layer.some((l) => l.id === e.layer[0]!.id))).toBe(false);
      }),
      { numRuns: 300 },
    );
  });
});
