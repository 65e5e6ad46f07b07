// Definition edits in the change log (issue 15 item 6): who, when, before -> after, why.
// The entry shape follows MacQueen et al. (1998)'s codebook change history as DESIGN §3 asks: who, when, why, which round.
import { describe, expect, it } from 'vitest';
import { addCode, createCodebookDoc, getDefinitionText, lastDefinitionEdits, listChanges, recordDefinitionEdit, EDIT_TEXT_LIMIT } from './index.js';
import { InvalidArgumentError, NotFoundError } from './errors.js';

let t = 1000;
const lead = { by: 'lead', clock: () => ++t };

describe('recordDefinitionEdit', () => {
  it('logs who, when, the field, before and after, and the reason', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, { label: 'Workload', briefDefinition: 'Too much to do.' }, lead);
    getDefinitionText(cb, id, 'briefDefinition').insert(15, ' Named hours.');
    const e = recordDefinitionEdit(cb, { ...lead, reason: 'coders asked for hours' }, id, 'briefDefinition', 'Too much to do.', 'Too much to do. Named hours.')!;
    expect(e).toMatchObject({ kind: 'edit', by: 'lead', field: 'briefDefinition', before: 'Too much to do.', after: 'Too much to do. Named hours.', reason: 'coders asked for hours', codeIds: [id] });
    expect(listChanges(cb, id).map((c) => c.kind)).toEqual(['add', 'edit']);
    expect(lastDefinitionEdits(cb).get(id)?.id).toBe(e.id);
  });

  it('logs nothing when the text ended where it began, and refuses unknown codes and fields', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, { label: 'Workload' }, lead);
    expect(recordDefinitionEdit(cb, lead, id, 'inclusion', 'same', 'same')).toBeNull();
    expect(listChanges(cb, id)).toHaveLength(1);
    expect(() => recordDefinitionEdit(cb, lead, 'nope', 'inclusion', 'a', 'b')).toThrow(NotFoundError);
    expect(() => recordDefinitionEdit(cb, lead, id, 'colour' as never, 'a', 'b')).toThrow(InvalidArgumentError);
  });

  it('keeps the start and end of very long texts', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, { label: 'Workload' }, lead);
    const long = 'a'.repeat(EDIT_TEXT_LIMIT) + 'END';
    const e = recordDefinitionEdit(cb, lead, id, 'fullDefinition', '', long)!;
    expect(e.after!.length).toBeLessThanOrEqual(EDIT_TEXT_LIMIT);
    expect(e.after!.endsWith('END')).toBe(true);
    expect(e.after).toContain('…');
  });
});
