/** A small XML writer: escaping that keeps every character of the data, and elements as nested calls. */

// XML 1.0 §2.2: characters a document may not hold at all, even escaped. They become U+FFFD (one code
// point for one, so positions counted in code points stay right).
const ILLEGAL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

export function escapeText(s: string): string {
  // CR is escaped: a parser turns a literal CR (and CRLF) into LF (XML 1.0 §2.11).
  return s.replace(ILLEGAL, '\uFFFD').replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/\r/g, '&#13;');
}

export function escapeAttr(s: string): string {
  // Attribute values are normalised on parsing (tabs and newlines become spaces, §3.3.3): escape them.
  return escapeText(s).replace(/"/g, '&quot;').replace(/\n/g, '&#10;').replace(/\t/g, '&#9;');
}

export type Attrs = Record<string, string | number | boolean | null | undefined>;

export function attrs(a: Attrs): string {
  let out = '';
  for (const [k, v] of Object.entries(a)) if (v !== null && v !== undefined) out += ` ${k}="${escapeAttr(String(v))}"`;
  return out;
}

/** An element: children are strings already serialised; an element without children closes itself. */
export function el(name: string, a: Attrs = {}, ...children: Array<string | false | null | undefined>): string {
  const inner = children.filter((c): c is string => typeof c === 'string' && c !== '').join('');
  return inner === '' ? `<${name}${attrs(a)}/>` : `<${name}${attrs(a)}>${inner}</${name}>`;
}

/** An element holding text (kept whole, even when empty or only spaces). */
export function textEl(name: string, text: string, a: Attrs = {}): string {
  return `<${name}${attrs(a)}>${escapeText(text)}</${name}>`;
}

/** xsd:decimal has no exponent: 1e-7 is written 0.0000001. */
export function decimal(n: number): string {
  const s = String(n);
  if (!/e/i.test(s)) return s;
  return n.toFixed(20).replace(/\.?0+$/, '');
}
