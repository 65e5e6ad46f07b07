import { describe, expect, it } from 'vitest';
import { assignMarks, DISTINCT_MARKS, isHexColour, MARKS, OKABE_ITO, paletteColour } from './palette.js';

describe('palette', () => {
  it('is the Okabe & Ito (2008) set: hex values match their published RGB triples', () => {
    // RGB triples from Okabe & Ito, "Color Universal Design", jfly.uni-koeln.de/color (from memory).
    const rgb: Record<string, [number, number, number]> = {
      orange: [230, 159, 0], 'sky blue': [86, 180, 233], 'bluish green': [0, 158, 115], yellow: [240, 228, 66],
      blue: [0, 114, 178], vermillion: [213, 94, 0], 'reddish purple': [204, 121, 167], black: [0, 0, 0],
    };
    expect(OKABE_ITO.map((c) => c.name).sort()).toEqual(Object.keys(rgb).sort());
    for (const c of OKABE_ITO) {
      const [r, g, b] = rgb[c.name]!;
      expect(c.hex.toUpperCase()).toBe('#' + [r, g, b].map((x) => x.toString(16).padStart(2, '0')).join('').toUpperCase());
    }
  });

  it('cycles with a pattern index after eight codes', () => {
    expect(paletteColour(0)).toEqual({ hex: '#E69F00', pattern: 0 });
    expect(paletteColour(9)).toEqual({ hex: OKABE_ITO[1]!.hex, pattern: 1 });
    expect(isHexColour('#00aaFF')).toBe(true);
    expect(isHexColour('red')).toBe(false);
  });
});

describe('assignMarks', () => {
  // The rule checked: WCAG 2.1 SC 1.4.1 "Use of Color" — colour is not the only way codes are told
  // apart; each pair (colour, mark) is given to at most one code while pairs remain.
  const pairs = (a: ReturnType<typeof assignMarks>) => [...a.marks.values()].map((m) => `${m.hex.toUpperCase()} ${m.mark}`);

  it('gives 18 codes stored on the eight-colour cycle (as the demo codebook is) 18 different pairs', () => {
    const codes = Array.from({ length: 18 }, (_, i) => ({ id: `c${i}`, colour: paletteColour(i).hex }));
    const a = assignMarks(codes);
    expect(new Set(pairs(a)).size).toBe(18);
    expect(a.overflow).toBe(false);
    // a code keeps its stored colour while a mark of that colour is free
    expect(a.marks.get('c3')!.hex).toBe(codes[3]!.colour);
  });

  it('separates codes that all store the same colour, moving to other colours once its marks run out', () => {
    const codes = Array.from({ length: 10 }, (_, i) => ({ id: `y${i}`, colour: '#F0E442' }));
    const a = assignMarks(codes);
    expect(new Set(pairs(a)).size).toBe(10);
    expect([...a.marks.values()].filter((m) => m.hex === '#F0E442')).toHaveLength(MARKS.length);
  });

  it('is unique up to DISTINCT_MARKS codes and reports overflow one past it', () => {
    const many = (n: number) => Array.from({ length: n }, (_, i) => ({ id: `k${i}` }));
    const full = assignMarks(many(DISTINCT_MARKS));
    expect(new Set(pairs(full)).size).toBe(DISTINCT_MARKS);
    expect(full.overflow).toBe(false);
    const over = assignMarks(many(DISTINCT_MARKS + 1));
    expect(over.overflow).toBe(true);
    expect(over.marks.size).toBe(DISTINCT_MARKS + 1);
  });

  it('never hands out black to a code without a colour (it reads as text)', () => {
    const a = assignMarks(Array.from({ length: DISTINCT_MARKS }, (_, i) => ({ id: `k${i}` })));
    expect([...a.marks.values()].some((m) => m.hex === '#000000')).toBe(false);
  });

  it('holds for random codebooks: random stored colours (some off the palette), random sizes', () => {
    // seeded LCG (Numerical Recipes constants) so a failure can be replayed
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    for (let run = 0; run < 200; run++) {
      const n = 1 + Math.floor(rnd() * DISTINCT_MARKS);
      const codes = Array.from({ length: n }, (_, i) => {
        const r = rnd();
        return { id: `r${i}`, colour: r < 0.5 ? OKABE_ITO[Math.floor(rnd() * 8)]!.hex : r < 0.6 ? '#123456' : undefined };
      });
      const a = assignMarks(codes);
      if (!a.overflow) expect(new Set(pairs(a)).size).toBe(n);
      // off-palette stored colours add pairs of their own, so up to DISTINCT_MARKS codes never overflow
      expect(a.overflow).toBe(false);
    }
  });

  it('overflows exactly when there are more codes than the pairs it reports (random sizes past the palette)', () => {
    let seed = 777;
    const rnd = () => ((seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    for (let run = 0; run < 200; run++) {
      const n = 1 + Math.floor(rnd() * DISTINCT_MARKS * 2);
      const codes = Array.from({ length: n }, (_, i) => {
        const r = rnd();
        return { id: `s${i}`, colour: r < 0.4 ? OKABE_ITO[Math.floor(rnd() * 8)]!.hex : r < 0.5 ? '#123456' : undefined };
      });
      const a = assignMarks(codes);
      expect(a.overflow).toBe(n > a.pairs);
      if (!a.overflow) expect(new Set(pairs(a)).size).toBe(n);
    }
  });
});
