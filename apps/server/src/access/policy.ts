/**
 * The one table that says which role may do what in a study. Every permission check in the server
 * reads it; nothing else encodes role rules. Calibration rounds narrow it per document
 * (`documentAccess`): during a round's independent phase its participants see no one else's layer of
 * the round's texts and nobody sees a round layer but its coder; consensus layers are written by
 * lead and owner while the round is revealed.
 */
import type { Role, WriteRule } from '../sync/contracts.js';
import type { DocRounds, RoundFacts } from './rounds.js';

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
  'round.read', // see the study's rounds (names, phases, progress of one's own)
  'round.manage', // start, reveal, close a round; see its progress board
  'consensus.write', // adjudicate into a round's consensus layer
  'study.delete', // remove the study and every row of it
  'text.delete', // remove a text and every row of it
  'deid.manage', // find identifiers, apply pseudonyms, purge the originals
  'deid.key', // read, export and delete the pseudonym key
  'text.readUnassigned', // read texts nobody assigned to you (trainees read only their assigned texts)
  'supervision.manage', // assign texts, choose references, review trainees' layers, share comparisons
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
  'layer.readOthers':   { owner: o, lead: o, coder: o, trainee: _, observer: o },
  'codebook.write':     { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'codebook.propose':   { owner: o, lead: o, coder: o, trainee: o, observer: _ },
  'memos.write':        { owner: o, lead: o, coder: o, trainee: o, observer: _ },
  'members.read':       { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'members.manage':     { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'members.resetPassword': { owner: o, lead: _, coder: _, trainee: _, observer: _ },
  'export':             { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'audit.view':         { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'agreement.read':     { owner: o, lead: o, coder: _, trainee: _, observer: o },
  'round.read':         { owner: o, lead: o, coder: o, trainee: o, observer: o },
  'round.manage':       { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'consensus.write':    { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'study.delete':       { owner: o, lead: _, coder: _, trainee: _, observer: _ },
  'text.delete':        { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'deid.manage':        { owner: o, lead: o, coder: _, trainee: _, observer: _ },
  'deid.key':           { owner: o, lead: _, coder: _, trainee: _, observer: _ },
  'text.readUnassigned': { owner: o, lead: o, coder: o, trainee: _, observer: o },
  'supervision.manage': { owner: o, lead: o, coder: _, trainee: _, observer: _ },
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

export interface DocumentAccess extends RoomAccess {
  /**
   * The reader is a participant coding this document's text independently: other people's presence
   * fields that show where they point (caret, selection, hovered segment) are withheld from them.
   */
  hidePointing: boolean;
  /** Why reading is refused, in plain words (when `read` is false). */
  reason?: string;
}

export interface AccessDoc {
  /** The document's room; needed to match a layer shared with a trainee. */
  id?: string;
  kind: 'text' | 'layer' | 'codebook' | 'memos';
  coderId: string | null;
  roundId?: string | null;
}

/**
 * What supervision says about the reader and the document's text (issue 9), from `supervisionFor`
 * (access/supervision.ts). Study-wide documents (codebook, memos) ignore it.
 */
export interface DocSupervision {
  /** The text is assigned to the reader, or is in a round the reader takes part in. */
  assigned: boolean;
  /** Layer rooms a supervisor shared with the reader (a text's reference, with the comparison shared). */
  shared: ReadonlySet<string>;
}

/** For study-wide documents and for callers deciding about roles that supervision does not narrow. */
export const NO_SUPERVISION: DocSupervision = { assigned: false, shared: new Set() };

const independentFor = (round: RoundFacts | null, userId: string) => round !== null && round.phase === 'independent' && round.participants.has(userId);

export const NOT_ASSIGNED = 'This text is not assigned to you.';

/**
 * The one decision about a document with rounds and supervision taken into account; the sync upgrade
 * and every route that reads texts or layers ask it. `rounds` comes from `roundsForDocument`,
 * `supervision` from `supervisionFor`. A trainee reads only texts assigned to them (or in a round they
 * take part in), and of others' layers only one a supervisor shared.
 */
export function documentAccess(role: Role, doc: AccessDoc, userId: string, rounds: DocRounds, supervision: DocSupervision): DocumentAccess {
  const { layerRound, openRound } = rounds;
  const hidePointing = independentFor(openRound, userId);
  const no = (reason: string): DocumentAccess => ({ read: false, write: false, hidePointing, reason });
  const textBound = doc.kind === 'text' || doc.kind === 'layer';
  if (textBound && !can(role, 'text.readUnassigned') && !supervision.assigned) return no(NOT_ASSIGNED);
  if (doc.kind !== 'layer') return { ...roomAccess(role, doc, userId), hidePointing };
  // A layer a supervisor shared with this reader (a text's reference): read only, outside the independent phase.
  const shared = doc.id !== undefined && doc.coderId !== userId && supervision.shared.has(doc.id) && !hidePointing && !(layerRound && layerRound.phase === 'independent');
  if (shared) return { read: true, write: false, hidePointing };
  if (doc.roundId && !layerRound) return no('This layer’s round no longer exists.');
  if (doc.coderId === null) {
    // A round's consensus layer: empty until the reveal, adjudicated while revealed, kept after close.
    if (!layerRound || layerRound.phase === 'independent') return no('The consensus layer opens when the round is revealed.');
    if (hidePointing) return no('You are coding this text independently in a round.');
    return { read: can(role, 'layer.readOthers'), write: layerRound.phase === 'revealed' && can(role, 'consensus.write'), hidePointing };
  }
  if (doc.coderId === userId) {
    if (!layerRound) return { read: true, write: can(role, 'layer.writeOwn'), hidePointing };
    // A round layer takes coding during the independent phase only: what is coded after seeing others is not independent.
    return { read: true, write: layerRound.phase === 'independent' && can(role, 'layer.writeOwn'), hidePointing };
  }
  if (!can(role, 'layer.readOthers')) return no('Your role does not let you read others’ layers.');
  if (hidePointing) return no('You are coding this text independently in a round: others’ layers open after the reveal.');
  if (layerRound && layerRound.phase === 'independent') return no('Layers of a round open to others when the round is revealed.');
  return { read: true, write: false, hidePointing };
}
