import { checkCodedText, type CodedSegment, type CodedText } from './coded-text.js';
import { AgreementError } from './errors.js';
import { fixedUnitPatterns } from './tallies.js';

/** Label of the row and column for "no code here". */
export const NO_CODE = '(none)';

export interface CodeConfusion {
  coders: [string, string];
  unit: 'fixed' | 'character';
  /** codes, then NO_CODE last */
  labels: string[];
  /** rows: first coder, columns: second coder; units (or characters) */
  table: number[][];
}

/**
 * Which codes two coders gave to the same stretches of text, side by side. For each unit (or
 * character), a code both coders applied counts once on the diagonal; the codes only one of them
 * applied are then crossed with the codes only the other applied (each such pair counts the unit),
 * or with NO_CODE when the other applied nothing further. A unit neither coded counts at
 * (NO_CODE, NO_CODE). Common practice for multi-code data; not a published procedure.
 * Only texts that both coders coded (per the text's `coders`, when given) are counted.
 */
export function codeConfusion(
  texts: ReadonlyArray<CodedText>,
  first: string,
  second: string,
  options: { codes?: ReadonlyArray<string>; unit?: 'fixed' | 'character' } = {},
): CodeConfusion {
  if (!Array.isArray(texts)) throw new AgreementError('invalid-input', 'texts must be an array');
  if (first === second) throw new AgreementError('invalid-input', 'two different coders are needed');
  for (const t of texts) checkCodedText(t);
  const codes = options.codes ? [...options.codes] : [...new Set(texts.flatMap((t) => t.segments.map((s: CodedSegment) => s.codeId)))];
  const unit = options.unit ?? (texts.length > 0 && texts.every((t) => t.units) ? 'fixed' : 'character');
  const C = codes.length;
  const codeIndex = new Map(codes.map((c, i) => [c, i]));
  const bit = new Map([
    [first, 1],
    [second, 2],
  ]);
  const table = Array.from({ length: C + 1 }, () => new Array<number>(C + 1).fill(0));
  const add = (a: number[], b: number[], w: number) => {
    const inB = new Set(b);
    const both = a.filter((c) => inB.has(c));
    const onlyA = a.filter((c) => !both.includes(c));
    const onlyB = b.filter((c) => !both.includes(c));
    for (const c of both) table[c]![c]! += w;
    if (both.length === 0 && onlyA.length === 0 && onlyB.length === 0) table[C]![C]! += w;
    const rows = onlyA.length ? onlyA : onlyB.length ? [C] : [];
    const cols = onlyB.length ? onlyB : onlyA.length ? [C] : [];
    for (const r of rows) for (const c of cols) table[r]![c]! += w;
  };
  for (const text of texts) {
    if (text.coders && !(text.coders.includes(first) && text.coders.includes(second))) continue;
    if (unit === 'fixed') {
      if (!text.units) throw new AgreementError('invalid-input', `text ${text.textId} has no units`);
      const masks = fixedUnitPatterns(text, codeIndex, bit, C);
      for (let u = 0; u < text.units.length; u++) {
        const a: number[] = [];
        const b: number[] = [];
        for (let c = 0; c < C; c++) {
          const m = masks[c]![u]!;
          if (m & 1) a.push(c);
          if (m & 2) b.push(c);
        }
        add(a, b, 1);
      }
    } else {
      const events: Array<[number, number, number]> = []; // [pos, slot = who*C + code, +1|-1]
      for (const s of text.segments) {
        const c = codeIndex.get(s.codeId);
        const who = s.coderId === first ? 0 : s.coderId === second ? 1 : -1;
        if (c === undefined || who < 0) continue;
        events.push([s.start, who * C + c, 1], [s.end, who * C + c, -1]);
      }
      events.sort((x, y) => x[0] - y[0]);
      const depth = new Int32Array(2 * C);
      let pos = 0;
      let i = 0;
      const flush = (to: number) => {
        if (to <= pos) return;
        const a: number[] = [];
        const b: number[] = [];
        for (let c = 0; c < C; c++) {
          if (depth[c]! > 0) a.push(c);
          if (depth[C + c]! > 0) b.push(c);
        }
        add(a, b, to - pos);
        pos = to;
      };
      while (i < events.length) {
        const at = events[i]![0];
        flush(at);
        while (i < events.length && events[i]![0] === at) {
          const [, slot, d] = events[i]!;
          depth[slot] = depth[slot]! + d;
          i++;
        }
      }
      flush(text.textLength);
    }
  }
  return { coders: [first, second], unit, labels: [...codes, NO_CODE], table };
}
