import { describe, expect, it } from 'vitest';
import { ACTION_RULES, decide, refusedMessage, savedMessage, undoMessage, type CodingAction } from './coding-actions.js';
import { ROLES } from '../../api/types.js';

const ALL = Object.keys(ACTION_RULES) as CodingAction[];

describe('coding actions: one table of who may do what, and the words', () => {
  it('tells an observer, in plain words, that nothing they try is saved (issue 15: "Not saved: observers cannot add jottings")', () => {
    expect(decide('observer', 'jot')).toEqual({ allowed: false, message: 'Not saved: observers cannot add jottings.' });
    expect(decide('observer', 'code')).toEqual({ allowed: false, message: 'Not saved: observers cannot code passages.' });
    expect(decide('observer', 'new-code')).toEqual({ allowed: false, message: 'Not saved: observers cannot create codes.' });
    expect(decide('observer', 'in-vivo')).toEqual({ allowed: false, message: 'Not saved: observers cannot create in vivo codes.' });
    expect(decide('observer', 'reply')).toEqual({ allowed: false, message: 'Not saved: observers cannot reply to memos.' });
    for (const role of ['coder', 'trainee', 'lead', 'owner'] as const) expect(decide(role, 'reply').allowed).toBe(true);
  });

  it('lets coders and trainees code and propose codes, but not write the codebook or correct the text', () => {
    for (const role of ['coder', 'trainee'] as const) {
      expect(decide(role, 'code')).toEqual({ allowed: true, proposal: false });
      expect(decide(role, 'in-vivo')).toEqual({ allowed: true, proposal: true });
      expect(decide(role, 'new-code')).toEqual({ allowed: true, proposal: true });
      expect(decide(role, 'correct')).toEqual({ allowed: false, message: `Not saved: ${role}s cannot correct the transcript.` });
      expect(decide(role, 'example')).toEqual({ allowed: false, message: `Not saved: ${role}s cannot add examples to the codebook.` });
    }
  });

  it('lets the lead and owner do everything here, writing codes directly', () => {
    for (const role of ['lead', 'owner'] as const) for (const a of ALL) {
      const d = decide(role, a);
      expect(d.allowed).toBe(true);
      if (d.allowed) expect(d.proposal).toBe(false);
    }
  });

  it('gives every refusal one shape, naming the role and the action', () => {
    for (const role of ROLES) for (const a of ALL) {
      const d = decide(role, a);
      if (!d.allowed) expect(d.message).toMatch(new RegExp(`^Not saved: ${role}s cannot ${ACTION_RULES[a].what}\\.$`));
    }
  });

  it('follows the server when it sends the study\'s permissions (a role changed since the table was written)', () => {
    expect(decide('coder', 'jot', { permissions: ['layer.writeOwn'] })).toEqual({ allowed: false, message: 'Not saved: coders cannot add jottings.' });
    expect(decide('observer', 'code', { permissions: ['layer.writeOwn'] })).toEqual({ allowed: true, proposal: false });
    expect(decide('coder', 'code', { hasLayer: false })).toEqual({ allowed: false, message: 'Not saved: you have no layer on this text.' });
  });

  it('words the server\'s answers and undo', () => {
    expect(savedMessage('Coded “Workload”.', 'saved')).toBe('Coded “Workload”. Saved.');
    expect(savedMessage('Coded “Workload”.', 'offline')).toMatch(/^Coded “Workload”\. Kept on this device only/);
    expect(refusedMessage('read-only')).toBe('Not saved: the server refused it (you may now only read this document). It has been taken back here.');
    expect(undoMessage('undo', 'coded “Workload”.')).toBe('Undone: coded “Workload”.');
    expect(undoMessage('redo', undefined)).toBe('Nothing to redo.');
  });
});
