/**
 * The one table that says which role may do what in a study. Every permission check in the server
 * reads it; nothing else encodes role rules. (A later issue adds independent rounds, which hide
 * other coders' layers from coders and trainees until the reveal: that narrows `layer.readOthers`.)
 */
import type { Role, WriteRule } from '../sync/contracts.js';

export const ACTIONS = [
  'study.read',
  'study.update',
  'text.read',
  'text.correct', // edit the transcript itself (corrections, de-identification)
  'text.import',
  'layer.writeOwn',
  'layer.readOthers',
  'codebook.write',
  'codebook.propose',
  'memos.write',
  'members.read',
  'members.manage',
  'members.resetPassword', // issue a password-reset link for a member
  'export',
  'audit.view',
  'agreement.read', // intercoder agreement: compares everyone's layers, so not for those still coding
] as const;
export type Action = (typeof ACTIONS)[number];

const o = true;
const _ = false;

// prettier-ignore
const TABLE: Record<Action, Record<Role, boolean>> = {
  //                      owner  lead  coder  trainee  observer
  'study.read':         { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'study.update':       { owner: o, lead: _, coder: _, trainee: _, observer: _ },
  'text.read':          { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'text.correct':       { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'text.import':        { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'layer.writeOwn':     { owner: o, lead: o, coder: o, trainee: o, observer: _ },
  'layer.readOthers':   { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'codebook.write':     { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'codebook.propose':   { owner: o, lead: o, coder: o, trainee: o, observer: _ },
  'memos.write':        { owner: o, lead: o, coder: o, trainee: o, observer: _ },
  'members.read':       { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'members.manage':     { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'members.resetPassword': { owner: o, lead: _, coder: _, trainee: _, observer: _ },
  'export':             { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'audit.view':         { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'agreement.read':     { owner: o, lead: o, coder: _, trainee: _, observer: o },
};

export function can(role: Role, action: Action): boolean {
  return TABLE[action][role];
}

/** Roles only an owner may grant or take away (a lead cannot make or unmake owners). */
export function canAssignRole(actor: Role, role: Role): boolean {
  if (!can(actor, 'members.manage')) return false;
  return role !== 'owner' || actor === 'owner';
}

export interface RoomAccess {
  read: boolean;
  /** May write anything in the document. */
  write: boolean;
  /**
   * May write only part of it, checked on the server update by update (access/write-rules.ts). With
   * `write` true it narrows that write; with `write` false it is the only write there is.
   */
  writeRule?: WriteRule;
}

/** What a member may do with one document, by its kind (and, for a layer, whose it is). */
export function roomAccess(
  role: Role,
  doc: { kind: 'text' | 'layer' | 'codebook' | 'memos'; coderId: string | null },
  userId: string,
): RoomAccess {
  switch (doc.kind) {
    case 'text':
      return { read: can(role, 'text.read'), write: can(role, 'text.correct') };
    case 'layer': {
      const own = doc.coderId === userId;
      if (own) return { read: true, write: can(role, 'layer.writeOwn') };
      return { read: can(role, 'layer.readOthers'), write: false };
    }
    case 'codebook': {
      const write = can(role, 'codebook.write');
      // Those who may only propose write new proposals of their own, nothing else (write-rules.ts).
      return { read: can(role, 'study.read'), write, ...(!write && can(role, 'codebook.propose') ? { writeRule: 'proposals-only' as const } : {}) };
    }
    case 'memos':
      // Each person writes only their own memos: checked per update on the server (write-rules.ts).
      return { read: can(role, 'study.read'), write: can(role, 'memos.write'), ...(can(role, 'memos.write') ? { writeRule: 'own-memos' as const } : {}) };
  }
}
