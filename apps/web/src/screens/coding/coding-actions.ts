/**
 * The one table of what each role may do in the coding view, and what the person is told (pure).
 * Allowed or not follows the server's role table (apps/server/src/access/policy.ts; the study's
 * `permissions` list, when the server sends it, wins over the copy here); the words are ours. Every
 * message the coding view shows for these actions comes from here, so a test can check them all.
 */
import type { Role } from '../../api/types.js';

export type CodingAction =
  | 'code' | 'recode' | 'resize' | 'remove' | 'note' | 'recheck' | 'undo' | 'redo'
  | 'in-vivo' | 'new-code' | 'jot' | 'reply' | 'correct' | 'example';

/** The server permission each action needs (names as in the server's role table). */
type Permission = 'layer.writeOwn' | 'codebook.write' | 'codebook.propose' | 'memos.write' | 'text.correct';

interface Rule {
  /** Needed to do it at all. */
  needs: Permission;
  /** With this too, a new code goes straight into the codebook; without it, it is a proposal. */
  direct?: Permission;
  /** The action as words after "cannot": "code passages". */
  what: string;
}

export const ACTION_RULES: Record<CodingAction, Rule> = {
  code: { needs: 'layer.writeOwn', what: 'code passages' },
  recode: { needs: 'layer.writeOwn', what: 'recode segments' },
  resize: { needs: 'layer.writeOwn', what: 'resize segments' },
  remove: { needs: 'layer.writeOwn', what: 'remove segments' },
  note: { needs: 'layer.writeOwn', what: 'add notes to segments' },
  recheck: { needs: 'layer.writeOwn', what: 'mark segments re-checked' },
  undo: { needs: 'layer.writeOwn', what: 'undo coding' },
  redo: { needs: 'layer.writeOwn', what: 'redo coding' },
  'in-vivo': { needs: 'codebook.propose', direct: 'codebook.write', what: 'create in vivo codes' },
  'new-code': { needs: 'codebook.propose', direct: 'codebook.write', what: 'create codes' },
  jot: { needs: 'memos.write', what: 'add jottings' },
  reply: { needs: 'memos.write', what: 'reply to memos' },
  correct: { needs: 'text.correct', what: 'correct the transcript' },
  example: { needs: 'codebook.write', what: 'add examples to the codebook' },
};

/** The server's role table as it stands, for the permissions this view needs (policy.ts; a test compares). */
// prettier-ignore
export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  owner: ['layer.writeOwn', 'codebook.write', 'codebook.propose', 'memos.write', 'text.correct'],
  lead: ['layer.writeOwn', 'codebook.write', 'codebook.propose', 'memos.write', 'text.correct'],
  coder: ['layer.writeOwn', 'codebook.propose', 'memos.write'],
  trainee: ['layer.writeOwn', 'codebook.propose', 'memos.write'],
  observer: [],
};

const ROLE_PLURAL: Record<Role, string> = { owner: 'owners', lead: 'leads', coder: 'coders', trainee: 'trainees', observer: 'observers' };

export type Decision = { allowed: true; proposal: boolean } | { allowed: false; message: string };

/**
 * May `role` do `action`? `permissions` is the study's list from the server when it sent one;
 * `hasLayer` is false when the server opened no layer of this person's on the text.
 */
export function decide(role: Role | undefined, action: CodingAction, opts: { permissions?: readonly string[] | undefined; hasLayer?: boolean } = {}): Decision {
  const rule = ACTION_RULES[action];
  const perms: readonly string[] = opts.permissions ?? (role ? ROLE_PERMISSIONS[role] : []);
  const who = role ? ROLE_PLURAL[role] : 'you';
  if (!perms.includes(rule.needs)) return { allowed: false, message: `Not saved: ${who} cannot ${rule.what}.` };
  if (rule.needs === 'layer.writeOwn' && opts.hasLayer === false) return { allowed: false, message: 'Not saved: you have no layer on this text.' };
  return { allowed: true, proposal: rule.direct !== undefined && !perms.includes(rule.direct) };
}

/** A refusal from the server for an action the table allowed (rights changed meanwhile, a rule it checks). */
export function refusedMessage(reason: string): string {
  const words = reason === 'read-only' || reason === 'you may only read this document.' ? 'you may now only read this document' : reason.replace(/\.$/, '');
  return `Not saved: the server refused it (${words}). It has been taken back here.`;
}

/** A change the server took, or one waiting on this device for a connection. */
export function savedMessage(done: string, outcome: 'saved' | 'offline'): string {
  return outcome === 'saved' ? `${done} Saved.` : `${done} Kept on this device only until you are back online; it is sent then.`;
}

/** What undo or redo did, in words ("Undone: coded “Pride in craft”."). */
export function undoMessage(kind: 'undo' | 'redo', what: string | undefined): string {
  if (!what) return kind === 'undo' ? 'Nothing to undo.' : 'Nothing to redo.';
  return `${kind === 'undo' ? 'Undone' : 'Redone'}: ${what}`;
}
