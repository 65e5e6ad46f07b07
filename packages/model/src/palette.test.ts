import { describe, expect, it } from 'vitest';
import { isHexColour, OKABE_ITO, paletteColour } from './palette.js';

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
