/**
 * The candidate finder on invented interview lines with identifiers placed by hand (the expected
 * candidates are those identifiers). Shapes of e-mail addresses per RFC 5322's common form, UK-style
 * phone numbers and street addresses: common practice.
 */
import { describe, expect, it } from 'vitest';
import { findCandidates, pseudonymSequence } from './finder.js';

const texts = [
  { id: 't1', text: 'P3: I started at Harrowgate Community Clinic after Dana Whitcombe left. Dana rang me on 07700 900123.\nI: When was that?\nP3: On 3 May 2019. I was 41 years old and lived at 14 Brannoc Road.' },
  { id: 't2', text: 'P5: Write to priya.okonkwo@example.org, Dana Whitcombe said. My sister Priya Okonkwo drove me to Glasgow. We met at the fenwick allotments.' },
];

describe('findCandidates', () => {
  const found = findCandidates(texts, ['fenwick'], new Map());
  const byOriginal = new Map(found.map((c) => [c.original, c]));

  it('finds the hand-placed identifiers of every kind', () => {
    expect(byOriginal.get('Dana Whitcombe')).toMatchObject({ kind: 'person', occurrences: 2, textIds: ['t1', 't2'] });
    expect(byOriginal.get('priya.okonkwo@example.org')?.kind).toBe('email');
    expect(byOriginal.get('07700 900123')?.kind).toBe('phone');
    expect(byOriginal.get('3 May 2019')?.kind).toBe('date');
    expect(byOriginal.get('41 years old')?.kind).toBe('age');
    expect(byOriginal.get('14 Brannoc Road')?.kind).toBe('address');
    expect(byOriginal.get('fenwick')?.kind).toBe('listed');
    expect(byOriginal.get('Harrowgate Community Clinic')?.kind).toBe('organisation');
    expect(byOriginal.get('Priya Okonkwo')?.kind).toBe('person');
    expect(byOriginal.get('Glasgow')?.kind).toBe('place');
  });

  it('gives one person one pseudonym: a first name alone shares the full name’s', () => {
    const full = byOriginal.get('Dana Whitcombe')!.suggestion;
    expect(full).toMatch(/^\[Person \d+\]$/);
    expect(byOriginal.get('Dana')?.suggestion).toBe(full);
    expect(byOriginal.get('Priya Okonkwo')!.suggestion).not.toBe(full);
  });

  it('takes the pseudonym already in the key, and numbers new ones after it', () => {
    const again = findCandidates(texts, [], new Map([['Dana Whitcombe', '[Person 1]']]));
    expect(again.find((c) => c.original === 'Dana Whitcombe')?.suggestion).toBe('[Person 1]');
    expect(again.find((c) => c.original === 'Priya Okonkwo')?.suggestion).toBe('[Person 2]');
    const next = pseudonymSequence(['[Place A]']);
    expect([next('place'), next('place'), next('date')]).toEqual(['[Place B]', '[Place C]', '[date]']);
  });

  it('does not run a name on across punctuation (words of the demo study that did)', () => {
    const found = findCandidates([{ id: 't3', text: "P2: I haven't told Bernadette. I've been thinking. Ask Colin Marrick, Jennet Fairlow or Mrs Aldous." }], [], new Map());
    const names = found.map((c) => c.original);
    expect(names).toContain('Bernadette');
    expect(names.filter((n) => /[.,]/.test(n))).toEqual([]);
  });

  it('takes a street that the name tagger calls a person for a place (a line of the demo study)', () => {
    const found = findCandidates([{ id: 't4', text: "P4: Mrs Aldous from Tanner's Row, she's ninety-one, she comes every time." }], [], new Map());
    const row = found.find((c) => c.original.startsWith('Tanner'));
    expect(row?.kind).toBe('place');
    expect(found.find((c) => c.original === 'Aldous')?.kind ?? 'person').toBe('person');
  });
});
