// The API's JSON is reduced to the web app's shapes; the shapes are the server's documented ones
// (apps/server/src/http: studies.ts, texts.ts, members.ts). A missing room is a typed error, not a crash.
import { describe, expect, it } from 'vitest';
import { ApiError } from './errors.js';
import { toMember, toStudy, toTextDetail } from './normalise.js';

describe('normalise', () => {
  it('reads a study with its codebook and memos rooms, in any of the accepted forms', () => {
    expect(toStudy({ id: 's1', title: 'Cinemas', role: 'lead', codebookRoom: 'cb', memosRoom: 'mm' })).toMatchObject({ codebookRoom: 'cb', memosRoom: 'mm', role: 'lead' });
    expect(toStudy({ id: 's1', title: 'Cinemas', rooms: { codebook: 'cb2', memos: 'mm2' } })).toMatchObject({ codebookRoom: 'cb2', memosRoom: 'mm2' });
  });

  it('refuses a study without rooms with a typed error', () => {
    expect(() => toStudy({ id: 's1', title: 'x', codebookRoom: null, memosRoom: 'm' })).toThrow(ApiError);
    try {
      toStudy({ id: 's1', title: 'x' });
    } catch (err) {
      expect((err as ApiError).code).toBe('bad_response');
    }
  });

  it('reads a text with its layers, and members', () => {
    const t = toTextDetail({ id: 't1', title: 'P01', room: 'r', layers: [{ room: 'l1', coderId: 'u1', name: 'Ann', mine: true, canWrite: true }] }, 't1');
    expect(t.layers).toEqual([{ room: 'l1', coderId: 'u1', name: 'Ann', mine: true, canWrite: true }]);
    // The open round the text is in, as the reader stands in it (GET /api/texts/:id, issue 8).
    const inRound = toTextDetail({ id: 't1', title: 'P01', room: 'r', layers: [], round: { id: 'r1', name: 'R', number: 1, phase: 'independent', participant: true } }, 't1');
    expect(inRound.round).toEqual({ id: 'r1', phase: 'independent', participant: true });
    expect(toTextDetail({ id: 't1', title: 'P01', room: 'r', layers: [], round: null }, 't1').round).toBeUndefined();
    expect(toMember({ userId: 'u1', name: 'Ann', email: 'a@example.org', role: 'coder' })).toEqual({ userId: 'u1', name: 'Ann', email: 'a@example.org', role: 'coder' });
  });
});
