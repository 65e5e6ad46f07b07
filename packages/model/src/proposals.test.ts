import { describe, expect, it } from 'vitest';
import { addCode, createCodebookDoc, getCodes } from './codebook-doc.js';
import { effectiveCodeId } from './codebook-ops.js';
import { acceptProposal, listProposals, mergeProposal, proposeCode } from './proposals.js';

describe('code proposals', () => {
  const lead = { by: 'lead', clock: () => 5 };

  it('an in vivo proposal keeps the words in quotation marks; accepting makes a code with the same id', () => {
    const cb = createCodebookDoc();
    const id = proposeCode(cb, { label: ' "we ran it on goodwill" ', author: 'ana', inVivo: true, textId: 't1', quote: 'we ran it on goodwill' }, () => 1);
    expect(listProposals(cb)).toMatchObject([{ id, label: '“we ran it on goodwill”', inVivo: true, author: 'ana', status: 'pending', textId: 't1' }]);
    expect(getCodes(cb)).toHaveLength(0);
    acceptProposal(cb, id, lead, 'Running on goodwill');
    expect(getCodes(cb).map((c) => [c.id, c.label, c.inVivo])).toEqual([[id, 'Running on goodwill', true]]);
    expect(listProposals(cb)[0]).toMatchObject({ status: 'accepted', decidedLabel: 'Running on goodwill', decidedBy: 'lead', decidedAt: 5 });
    expect(() => acceptProposal(cb, id, lead)).toThrow(/already decided/);
  });

  it('merging into an existing code leaves the proposed id merged into it, so segments carry over', () => {
    const cb = createCodebookDoc();
    const into = addCode(cb, { label: 'Volunteer labour' }, lead);
    const id = proposeCode(cb, { label: 'Unpaid hours', author: 'ben' });
    expect(() => mergeProposal(cb, id, 'k-none', lead)).toThrow(/not found/);
    expect(listProposals(cb, { status: 'pending' })).toHaveLength(1); // nothing half-done
    mergeProposal(cb, id, into, lead);
    expect(effectiveCodeId(cb, id)).toBe(into);
    expect(listProposals(cb)[0]).toMatchObject({ status: 'merged', mergedInto: into });
  });

  it('refuses an empty proposal or one without an author', () => {
    const cb = createCodebookDoc();
    expect(() => proposeCode(cb, { label: ' “” ', author: 'ana', inVivo: true })).toThrow(/selected words/);
    expect(() => proposeCode(cb, { label: '   ', author: 'ana' })).toThrow(/label/);
    expect(() => proposeCode(cb, { label: 'x', author: '' })).toThrow(/author/);
  });
});
