/**
 * Published reliability data used by the tests. Each block names where the data comes from; the
 * expected values live beside the assertions in the tests.
 */

/** Krippendorff (2011) "Computing Krippendorff's Alpha-Reliability" example A = Krippendorff (2004) p.224 (Mary, Ben). */
export const maryBen = [
  [0, 1, 0, 0, 0, 0, 0, 0, 1, 0],
  [1, 1, 1, 0, 0, 1, 0, 0, 0, 0],
];

/** Krippendorff (2004) p.227, 2 coders, values a/b/c, 12 units. */
export const threeValues = [
  ['a', 'a', 'b', 'b', 'b', 'b', 'b', 'c', 'c', 'c', 'c', 'c'],
  ['a', 'b', 'b', 'b', 'b', 'b', 'c', 'c', 'c', 'c', 'c', 'c'],
];

/** Krippendorff (2011) example C = Krippendorff (2004) p.230: 4 coders x 12 units, null = missing. */
export const k2011C = [
  [1, 2, 3, 3, 2, 1, 4, 1, 2, null, null, null],
  [1, 2, 3, 3, 2, 2, 4, 1, 2, 5, null, 3],
  [null, 3, 3, 3, 2, 3, 4, 2, 2, 5, 1, null],
  [1, 2, 3, 3, 2, 4, 4, 1, 2, 5, 1, null],
];

/** Wikipedia "Krippendorff's alpha", computational example: 3 coders x 15 units. */
export const wikipedia = [
  [null, null, null, null, null, 3, 4, 1, 2, 1, 1, 3, 3, null, 3],
  [1, null, 2, 1, 3, 3, 4, 3, null, null, null, null, null, null, null],
  [null, null, 2, 1, 3, 4, 4, null, 2, 1, 1, 3, 3, null, 4],
];

/** Fleiss (1971) Psychological Bulletin 76(5):378-382, p.379: 30 subjects x 6 raters, categories 1-5. */
export const fleiss1971 = [
  [4, 4, 4, 4, 4, 4], [2, 2, 2, 5, 5, 5], [2, 3, 3, 3, 3, 5], [5, 5, 5, 5, 5, 5], [2, 2, 2, 4, 4, 4],
  [1, 1, 3, 3, 3, 3], [3, 3, 3, 3, 5, 5], [1, 1, 3, 3, 3, 4], [1, 1, 4, 4, 4, 4], [5, 5, 5, 5, 5, 5],
  [1, 4, 4, 4, 4, 4], [1, 2, 4, 4, 4, 4], [2, 2, 2, 3, 3, 3], [1, 4, 4, 4, 4, 4], [2, 2, 4, 4, 4, 5],
  [3, 3, 3, 3, 3, 5], [1, 1, 1, 4, 5, 5], [1, 1, 1, 1, 1, 2], [2, 2, 4, 4, 4, 4], [1, 3, 3, 5, 5, 5],
  [5, 5, 5, 5, 5, 5], [2, 4, 4, 4, 4, 4], [2, 2, 4, 5, 5, 5], [1, 1, 4, 4, 4, 4], [1, 4, 4, 4, 4, 5],
  [2, 2, 2, 2, 2, 4], [1, 1, 1, 1, 5, 5], [2, 2, 4, 4, 4, 4], [1, 3, 3, 3, 3, 3], [5, 5, 5, 5, 5, 5],
];

/** Fleiss 1971 as counts (units x categories 1..5). */
export const fleiss1971Counts = fleiss1971.map((row) => [1, 2, 3, 4, 5].map((c) => row.filter((x) => x === c).length));

/** Fleiss 1971 as reliability data (raters x units). */
export const fleiss1971Data = fleiss1971[0]!.map((_, r) => fleiss1971.map((row) => row[r]!));

/** Krippendorff (1995) Sociological Methodology 25:47-76, p.57 pair A, digitised to 24 positions (as in DKPro's test). */
export const k1995A = [
  [0, 0, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0],
  [0, 0, 0, 0, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 1, 1, 0, 0, 0, 0, 0, 0, 0],
];
