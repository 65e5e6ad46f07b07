import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import {
  addCode, addExample, addExclusiveSet, addInVivoCode, addTheme, codeTree, createCodebookDoc, currentRound,
  getCode, getCodes, listChanges, listExclusiveSets, listThemes, removeExample, setThemeMember, startRound, enterRound, updateCodeField,
} from './codebook-doc.js';
import { ConflictError, InvalidArgumentError, NotFoundError } from './errors.js';
import { OKABE_ITO } from './palette.js';

let t = 100;
const lead = { by: 'lead', clock: () => ++t };

describe('codebook document', () => {
  it('holds MacQueen et al. (1998) entries under the DESIGN §2 root "codes", with Y.Text definitions', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, {
      label: 'reciprocity', briefDefinition: 'Help given expecting help back.', fullDefinition: 'Exchanges of help ...',
      inclusion: 'Use when the speaker links giving and receiving.', exclusion: 'Not for paid work.', type: 'theory-driven',
    }, lead);
    const m = cb.getMap('codes').get(id) as Y.Map<unknown>;
    expect(m.get('label')).toBe('reciprocity');
    for (const f of ['briefDefinition', 'fullDefinition', 'inclusion', 'exclusion']) expect(m.get(f)).toBeInstanceOf(Y.Text);
    const c = getCode(cb, id);
    expect(c).toMatchObject({ label: 'reciprocity', type: 'theory-driven', status: 'active', parentId: null, colour: OKABE_ITO[0]!.hex });
    expect(listChanges(cb, id).map((x) => [x.kind, x.by, x.round])).toEqual([['add', 'lead', 0]]);
  });

  it('edits a definition by its changed middle only, so a concurrent edit elsewhere survives', () => {
    const a = createCodebookDoc();
    const id = addCode(a, { label: 'home', inclusion: 'Talk of the house or flat.' }, lead);
    const b = new Y.Doc({ gc: false });
    Y.applyUpdate(b, Y.encodeStateAsUpdate(a));
    updateCodeField(a, id, 'inclusion', 'Talk of the house, flat or room.', { ...lead, reason: 'rooms count' });
    updateCodeField(b, id, 'inclusion', 'Any talk of the house or flat.', { by: 'kim' });
    Y.applyUpdate(a, Y.encodeStateAsUpdate(b));
    expect(getCode(a, id).inclusion).toBe('Any talk of the house, flat or room.');
    expect(listChanges(a, id).find((x) => x.reason === 'rooms count')?.field).toBe('inclusion');
  });

  it('rejects bad input with typed errors and changes nothing', () => {
    const cb = createCodebookDoc();
    expect(() => addCode(cb, { label: '  ' }, lead)).toThrow(InvalidArgumentError);
    expect(() => addCode(cb, { label: 'x', type: 'made-up' as never }, lead)).toThrow(InvalidArgumentError);
    expect(() => addCode(cb, { label: 'x', parentId: 'nope' }, lead)).toThrow(NotFoundError);
    const id = addCode(cb, { id: 'k1', label: 'x' }, lead);
    expect(() => addCode(cb, { id: 'k1', label: 'y' }, lead)).toThrow(ConflictError);
    expect(() => updateCodeField(cb, id, 'colour', 'red', lead)).toThrow(expect.objectContaining({ code: 'invalid-argument' }));
    expect(() => updateCodeField(cb, 'nope', 'inclusion', 'x', lead)).toThrow(expect.objectContaining({ code: 'not-found' }));
    expect(getCodes(cb)).toHaveLength(1);
  });

  it('makes in vivo codes from the participant\'s words, in quotation marks', () => {
    const cb = createCodebookDoc();
    const id = addInVivoCode(cb, '  keeping the lights\n on ', lead);
    expect(getCode(cb, id)).toMatchObject({ label: '“keeping the lights on”', inVivo: true });
    expect(() => addInVivoCode(cb, ' "" ', lead)).toThrow(InvalidArgumentError);
  });

  it('links examples and near-misses to segments', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, { label: 'thrift' }, lead);
    const e = addExample(cb, id, { textId: 't1', segmentId: 's1', quote: 'we mended everything' }, 'example', lead);
    addExample(cb, id, { textId: 't2', quote: 'money was tight' }, 'near-miss', lead);
    expect(getCode(cb, id).examples.map((x) => x.quote)).toEqual(['we mended everything']);
    expect(getCode(cb, id).nearMisses.map((x) => x.textId)).toEqual(['t2']);
    removeExample(cb, id, e, lead);
    expect(getCode(cb, id).examples).toEqual([]);
  });

  it('groups codes into themes and mutually exclusive sets; keeps a hierarchy; counts rounds', () => {
    const cb = createCodebookDoc();
    const root = addCode(cb, { label: 'community' }, lead);
    const kid = addCode(cb, { label: 'festivals', parentId: root }, lead);
    const other = addCode(cb, { label: 'solitude' }, lead);
    const th = addTheme(cb, 'public life', [root], lead);
    setThemeMember(cb, th, kid, true, lead);
    addExclusiveSet(cb, 'stance', [kid, other], lead);
    expect(listThemes(cb)).toEqual([{ id: th, label: 'public life', codeIds: [root, kid].sort() }]);
    expect(listExclusiveSets(cb)[0]!.codeIds).toEqual([kid, other].sort());
    const tree = codeTree(cb);
    expect(tree.map((n) => [n.code.label, n.children.map((c) => c.code.label)])).toEqual([['community', ['festivals']], ['solitude', []]]);
    expect(startRound(cb, lead)).toBe(1);
    expect(currentRound(cb)).toBe(1);
    updateCodeField(cb, kid, 'briefDefinition', 'Yearly gatherings.', lead);
    expect(listChanges(cb, kid).at(-1)).toMatchObject({ kind: 'edit', field: 'briefDefinition', round: 1 });
    // A server round numbered 3 stamps later edits with 3; going back is ignored.
    expect(enterRound(cb, 3, lead, 'round 3 revealed')).toBe(true);
    expect(enterRound(cb, 2, lead, 'late')).toBe(false);
    updateCodeField(cb, kid, 'briefDefinition', 'Yearly gatherings in the square.', lead);
    expect(listChanges(cb, kid).at(-1)).toMatchObject({ kind: 'edit', round: 3 });
    expect(listChanges(cb).filter((c) => c.kind === 'round').map((c) => c.detail)).toEqual(['round 1 started', 'round 3 revealed']);
  });
});
