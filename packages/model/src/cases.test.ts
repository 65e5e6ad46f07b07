import { describe, expect, it } from 'vitest';
import { createCodebookDoc } from './codebook-doc.js';
import { addCase, casesForText, defineAttribute, getCase, linkSpeaker, linkText, listAttributes, listCases, setCaseValue } from './cases.js';
import { InvalidArgumentError, NotFoundError } from './errors.js';

describe('cases and attributes', () => {
  it('keeps cases with typed attribute values, linked to texts, apart from codes', () => {
    const doc = createCodebookDoc();
    const age = defineAttribute(doc, { name: 'age', type: 'number' });
    const joined = defineAttribute(doc, { name: 'joined', type: 'date' });
    const site = defineAttribute(doc, { name: 'site', type: 'choice', choices: ['Harwick', 'Loman Quay'] });
    const carer = defineAttribute(doc, { name: 'carer', type: 'boolean' });
    const p = addCase(doc, { name: 'P07', textIds: ['t1'] });
    const q = addCase(doc, { name: 'Loman Quay', kind: 'site' });
    setCaseValue(doc, p, age, 54);
    setCaseValue(doc, p, joined, '2019-02-28');
    setCaseValue(doc, p, site, 'Harwick');
    setCaseValue(doc, p, carer, true);
    linkText(doc, q, 't1');
    linkText(doc, p, 't2');
    expect(getCase(doc, p)).toEqual({ id: p, name: 'P07', kind: 'participant', values: { [age]: 54, [joined]: '2019-02-28', [site]: 'Harwick', [carer]: true }, textIds: ['t1', 't2'], speakers: {} });
    expect(casesForText(doc, 't1').map((c) => c.name)).toEqual(['Loman Quay', 'P07']);
    expect(listAttributes(doc).map((a) => a.name)).toEqual(['age', 'carer', 'joined', 'site']);
    expect(doc.getMap('codes').size).toBe(0);
  });

  it('records which speaker of a text a case is (an import mapping speakers to cases), linking the text', () => {
    const doc = createCodebookDoc();
    const p = addCase(doc, { name: 'Participant 2' });
    linkSpeaker(doc, p, 't9', ' P02 ');
    expect(getCase(doc, p)).toMatchObject({ textIds: ['t9'], speakers: { t9: 'P02' } });
    expect(casesForText(doc, 't9').map((c) => c.name)).toEqual(['Participant 2']);
    expect(() => linkSpeaker(doc, p, 't9', '  ')).toThrow(InvalidArgumentError);
    expect(() => linkSpeaker(doc, 'nope', 't9', 'P02')).toThrow(NotFoundError);
  });

  it('refuses values that do not fit the attribute type', () => {
    const doc = createCodebookDoc();
    const age = defineAttribute(doc, { name: 'age', type: 'number' });
    const d = defineAttribute(doc, { name: 'interviewed', type: 'date' });
    const s = defineAttribute(doc, { name: 'site', type: 'choice', choices: ['A'] });
    const p = addCase(doc, { name: 'P1' });
    expect(() => setCaseValue(doc, p, age, '54')).toThrow(InvalidArgumentError);
    expect(() => setCaseValue(doc, p, age, Number.NaN)).toThrow(InvalidArgumentError);
    expect(() => setCaseValue(doc, p, d, '2023-02-30')).toThrow(InvalidArgumentError);
    expect(() => setCaseValue(doc, p, s, 'B')).toThrow(InvalidArgumentError);
    expect(() => setCaseValue(doc, p, 'nope', 1)).toThrow(NotFoundError);
    expect(() => defineAttribute(doc, { name: 'age', type: 'text' })).toThrow(InvalidArgumentError);
    expect(() => defineAttribute(doc, { name: 'c', type: 'choice' })).toThrow(InvalidArgumentError);
    expect(getCase(doc, p).values).toEqual({});
    expect(listCases(doc)).toHaveLength(1);
  });
});
