import { describe, expect, it } from 'vitest';
import type { CodeView } from '@gloss/model';
import { codeList } from './code-list.js';

const code = (id: string, label: string, parentId: string | null = null, extra: Partial<CodeView> = {}): CodeView => ({
  id, label, parentId, briefDefinition: '', fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [],
  colour: '#E69F00', type: 'data-driven', status: 'active', mergedInto: null, splitInto: [], inVivo: false, createdAt: 0, createdBy: 'u', ...extra,
} as CodeView);

// An invented codebook of our own: two parents with children, one retired code, one theme.
const codes = [
  code('work', 'Workload'),
  code('paper', 'Paperwork', 'work', { briefDefinition: 'forms, grants, licences' }),
  code('rota', 'Rota gaps', 'work'),
  code('place', 'Memory of the place'),
  code('old', 'Old building', 'place', { status: 'retired' }),
  code('seats', 'The seats', 'old'),
];
const themes = [{ id: 't', label: 'Keeping it going', codeIds: ['paper', 'rota'] }];

describe('codeList', () => {
  it('lists the whole codebook as a tree, children indented under their parent, retired codes left out', () => {
    const l = codeList(codes, themes, [], '');
    expect(l.map((e) => `${'  '.repeat(e.depth)}${e.code.label}`)).toEqual(['Workload', '  Paperwork', '  Rota gaps', 'Memory of the place', '  The seats']);
    expect(l.find((e) => e.code.id === 'paper')!.themes).toEqual(['Keeping it going']);
    expect(l.find((e) => e.code.id === 'seats')!.path).toEqual(['Memory of the place']);
  });

  it('puts recently used codes first, most recent first', () => {
    expect(codeList(codes, themes, ['rota', 'place'], '').map((e) => e.code.id).slice(0, 3)).toEqual(['rota', 'place', 'work']);
  });

  it('filters as one types: label starts first, then label, definition, parent or theme containing the words', () => {
    expect(codeList(codes, themes, [], 'pa').map((e) => e.code.id)).toEqual(['paper']);
    expect(codeList(codes, themes, [], 'place').map((e) => e.code.id)).toEqual(['place', 'seats']); // label, then parent
    expect(codeList(codes, themes, [], 'licences').map((e) => e.code.id)).toEqual(['paper']);
    expect(codeList(codes, themes, [], 'keeping').map((e) => e.code.id)).toEqual(['paper', 'rota']);
    expect(codeList(codes, themes, [], 'workload').map((e) => e.code.id)).toEqual(['work', 'paper', 'rota']);
    expect(codeList(codes, themes, ['rota'], 'keeping').map((e) => e.code.id)).toEqual(['rota', 'paper']);
  });

  it('survives a parent cycle left by concurrent moves (both go to the top)', () => {
    const cyc = [code('a', 'A', 'b'), code('b', 'B', 'a')];
    expect(codeList(cyc, [], [], '').map((e) => e.code.id).sort()).toEqual(['a', 'b']);
  });
});
