import { describe, expect, it } from 'vitest';
import { checkAttributeValue, type AttributeDef } from '@gloss/model';
import { cellText, cellValue } from './cell-value.js';

const def = (type: AttributeDef['type'], choices?: string[]): AttributeDef => ({ id: 'a', name: 'x', type, ...(choices ? { choices } : {}) });

describe('table cells read as typed attribute values (common practice: empty clears, the model refuses misfits)', () => {
  it('reads numbers, yes/no and clears on empty', () => {
    expect(cellValue(def('number'), ' 54 ')).toBe(54);
    expect(cellValue(def('number'), '3,5')).toBe(3.5);
    expect(cellValue(def('number'), '')).toBeNull();
    expect(cellValue(def('boolean'), 'yes')).toBe(true);
    expect(cellValue(def('boolean'), 'no')).toBe(false);
    expect(cellText(false)).toBe('no');
    expect(cellText(null)).toBe('');
  });

  it('passes misfits on so that the model refuses them', () => {
    expect(() => checkAttributeValue(def('number'), cellValue(def('number'), 'fifty'))).toThrow(/does not fit number/);
    expect(() => checkAttributeValue(def('number'), cellValue(def('number'), '12abc'))).toThrow(/does not fit number/);
    expect(() => checkAttributeValue(def('date'), cellValue(def('date'), '2023-02-30'))).toThrow(/does not fit date/);
    expect(() => checkAttributeValue(def('choice', ['Harwick']), cellValue(def('choice', ['Harwick']), 'Elsewhere'))).toThrow(/does not fit choice/);
    expect(checkAttributeValue(def('date'), cellValue(def('date'), '2024-02-29'))).toBe('2024-02-29');
  });
});
