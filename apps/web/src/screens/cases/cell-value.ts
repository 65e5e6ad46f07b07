/** What a table cell's input means for an attribute's type, before the model checks it (model/cases.ts). */
import type { AttributeDef, AttributeValue } from '@gloss/model';

/** Empty input clears the value; otherwise numbers and yes/no are read, and anything else is passed on for the model to refuse. */
export function cellValue(def: AttributeDef, raw: string): AttributeValue {
  const s = raw.trim();
  if (s === '') return null;
  switch (def.type) {
    case 'number': {
      const n = Number(s.replace(',', '.'));
      return Number.isFinite(n) && /^[-+]?\d*[.,]?\d+(e[-+]?\d+)?$/i.test(s) ? n : s;
    }
    case 'boolean':
      return s === 'yes' ? true : s === 'no' ? false : s;
    default:
      return s;
  }
}

export function cellText(value: AttributeValue | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  return String(value);
}
