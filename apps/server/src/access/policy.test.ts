/**
 * The role table against the rules in docs/DESIGN.md §2 and §6 and the task brief (the project's own
 * specification: no outside source defines these roles; the split of duties is common practice in
 * team coding — MacQueen et al. 1998 describe a codebook editor distinct from coders).
 */
import { describe, expect, it } from 'vitest';
import type { Role } from '../sync/contracts.js';
import { ACTIONS, can, canAssignRole, documentAccess, NOT_ASSIGNED, roomAccess, type DocSupervision } from './policy.js';

const ROLES: Role[] = ['owner', 'lead', 'coder', 'trainee', 'observer'];
const me = 'u-me';
const other = 'u-other';
/** Assigned, nothing shared: what every role but the trainee is decided with regardless. */
const open: DocSupervision = { assigned: true, shared: new Set() };

describe('role table', () => {
  it('gives the observer read-only access everywhere', () => {
    for (const kind of ['text', 'codebook', 'memos'] as const) expect(roomAccess('observer', { kind, coderId: null }, me)).toEqual({ read: true, write: false });
    expect(roomAccess('observer', { kind: 'layer', coderId: other }, me)).toEqual({ read: true, write: false });
    const writes = ACTIONS.filter((a) => !a.endsWith('.read') && a !== 'layer.readOthers' && a !== 'text.readUnassigned');
    for (const action of writes) expect(can('observer', action), action).toBe(false);
  });

  it('lets only owner and lead correct the text and write the codebook', () => {
    for (const role of ROLES) {
      const expected = role === 'owner' || role === 'lead';
      expect(roomAccess(role, { kind: 'text', coderId: null }, me).write, role).toBe(expected);
      expect(roomAccess(role, { kind: 'codebook', coderId: null }, me).write, role).toBe(expected);
      expect(roomAccess(role, { kind: 'codebook', coderId: null }, me).read, role).toBe(true);
    }
  });

  it('lets only its own coder write a layer; everyone but a trainee reads others’ layers (no rounds yet)', () => {
    for (const role of ROLES) {
      expect(roomAccess(role, { kind: 'layer', coderId: other }, me), role).toEqual({ read: role !== 'trainee', write: false });
    }
    for (const role of ['owner', 'lead', 'coder', 'trainee'] as const) {
      expect(roomAccess(role, { kind: 'layer', coderId: me }, me), role).toEqual({ read: true, write: true });
    }
  });

  it('lets every role but the observer write memos', () => {
    expect(ROLES.filter((r) => roomAccess(r, { kind: 'memos', coderId: null }, me).write)).toEqual(['owner', 'lead', 'coder', 'trainee']);
  });

  it('lets owner and lead manage members, but only an owner grant or remove the owner role', () => {
    expect(ROLES.filter((r) => can(r, 'members.manage'))).toEqual(['owner', 'lead']);
    expect(canAssignRole('owner', 'owner')).toBe(true);
    expect(canAssignRole('lead', 'owner')).toBe(false);
    expect(canAssignRole('lead', 'coder')).toBe(true);
    expect(canAssignRole('coder', 'trainee')).toBe(false);
  });
});

describe('rounds narrow the table (issue 8)', () => {
  const round = (phase: 'independent' | 'revealed' | 'closed', participants: string[]) => ({ id: 'r1', studyId: 's', phase, participants: new Set(participants) });
  const layer = (coderId: string | null, roundId: string | null = null) => ({ kind: 'layer' as const, coderId, roundId });

  it('independent phase: a participant reads only their own layers of the text, and its presence hides pointing', () => {
    const r = round('independent', [me, other]);
    const ctx = (own: boolean) => ({ openRound: r, layerRound: own ? r : null });
    expect(documentAccess('coder', layer(me, 'r1'), me, ctx(true), open)).toMatchObject({ read: true, write: true, hidePointing: true });
    expect(documentAccess('coder', layer(other, 'r1'), me, ctx(true), open).read).toBe(false);
    expect(documentAccess('coder', layer(other), me, ctx(false), open).read).toBe(false); // another's layer outside the round
    expect(documentAccess('lead', layer(other), me, ctx(false), open).read).toBe(false); // a participating lead too
    expect(documentAccess('coder', { kind: 'text', coderId: null }, me, ctx(false), open)).toMatchObject({ read: true, hidePointing: true });
    expect(documentAccess('coder', layer(null, 'r1'), me, ctx(true), open).read).toBe(false); // consensus waits for the reveal
  });

  it('independent phase: nobody but its coder opens a round layer; non-participants keep layers outside the round', () => {
    const r = round('independent', [other, 'u-third']);
    for (const role of ROLES) expect(documentAccess(role, layer(other, 'r1'), me, { openRound: r, layerRound: r }, open).read, role).toBe(false);
    expect(documentAccess('lead', layer(other), me, { openRound: r, layerRound: null }, open)).toMatchObject({ read: true, hidePointing: false });
  });

  it('revealed: round layers readable, frozen for their coder; consensus written by lead and owner only; closed: read-only', () => {
    const r = round('revealed', [me, other]);
    expect(documentAccess('coder', layer(other, 'r1'), me, { openRound: r, layerRound: r }, open)).toMatchObject({ read: true, write: false, hidePointing: false });
    expect(documentAccess('coder', layer(me, 'r1'), me, { openRound: r, layerRound: r }, open)).toMatchObject({ read: true, write: false });
    expect(ROLES.filter((role) => documentAccess(role, layer(null, 'r1'), me, { openRound: r, layerRound: r }, open).write)).toEqual(['owner', 'lead']);
    expect(ROLES.filter((role) => documentAccess(role, layer(null, 'r1'), me, { openRound: r, layerRound: r }, open).read)).toEqual(ROLES.filter((x) => x !== 'trainee')); // a trainee: only if shared
    const c = round('closed', [me, other]);
    expect(ROLES.filter((role) => documentAccess(role, layer(null, 'r1'), me, { openRound: null, layerRound: c }, open).write)).toEqual([]);
  });
});

describe('supervision narrows the table for trainees (issue 9)', () => {
  const none = { openRound: null, layerRound: null };
  const unassigned: DocSupervision = { assigned: false, shared: new Set() };
  const text = { kind: 'text' as const, coderId: null };
  const layer = (id: string, coderId: string | null, roundId: string | null = null) => ({ id, kind: 'layer' as const, coderId, roundId });

  it('a trainee opens neither the text nor any layer of a text not assigned to them; other roles are not narrowed', () => {
    expect(documentAccess('trainee', text, me, none, unassigned)).toMatchObject({ read: false, reason: NOT_ASSIGNED });
    expect(documentAccess('trainee', layer('l-mine', me), me, none, unassigned)).toMatchObject({ read: false, write: false, reason: NOT_ASSIGNED });
    for (const role of ['owner', 'lead', 'coder', 'observer'] as const) expect(documentAccess(role, text, me, none, unassigned).read, role).toBe(true);
    // Study-wide documents are not tied to one text.
    expect(documentAccess('trainee', { kind: 'codebook', coderId: null }, me, none, unassigned).read).toBe(true);
  });

  it('on an assigned text a trainee writes their own layer and reads another only when a supervisor shared it', () => {
    expect(documentAccess('trainee', text, me, none, open)).toMatchObject({ read: true, write: false });
    expect(documentAccess('trainee', layer('l-mine', me), me, none, open)).toMatchObject({ read: true, write: true });
    expect(documentAccess('trainee', layer('l-ref', other), me, none, open).read).toBe(false);
    const shared: DocSupervision = { assigned: true, shared: new Set(['l-ref']) };
    expect(documentAccess('trainee', layer('l-ref', other), me, none, shared)).toMatchObject({ read: true, write: false });
    expect(documentAccess('trainee', layer('l-other', other), me, none, shared).read).toBe(false);
    // Sharing never opens a layer during a round's independent phase.
    const r = { id: 'r1', studyId: 's', phase: 'independent' as const, participants: new Set([me]) };
    expect(documentAccess('trainee', layer('l-ref', other), me, { openRound: r, layerRound: null }, shared).read).toBe(false);
  });
});
