import * as Y from 'yjs';
import { addCode, codesMap, type Actor, type CodeView } from './codebook-doc.js';
import { paletteColour } from './palette.js';
import { effectiveCodeId, mergeCodes } from './codebook-ops.js';
import { ConflictError, InvalidArgumentError, NotFoundError } from './errors.js';
import { newId, systemClock, type Clock } from './ids.js';

/**
 * Code proposals: a coder (who may not write codes) proposes a new or in vivo code in the codebook
 * document under its own root, `proposals` (Y.Map<id, Y.Map>). The proposal's id is the id the code
 * will have, so a segment coded with it keeps pointing at the right thing: while the proposal is
 * pending the segment's codeId names the proposal; once the lead accepts or renames it a code with that
 * very id exists; once they merge it into an existing code, the new id is merged into that code (the
 * codebook's own merge, so `effectiveCodeId` and `reconcileLayer` carry the segment over).
 * The server lets a proposer write only new pending proposals of their own (apps/server access/write-rules.ts).
 */
export const PROPOSALS_ROOT = 'proposals';

export type ProposalStatus = 'pending' | 'accepted' | 'merged';

export interface ProposalView {
  id: string;
  label: string;
  inVivo: boolean;
  author: string;
  createdAt: number;
  /** Where it was first applied, if anywhere: the text and the quoted words. */
  textId: string | null;
  quote: string;
  status: ProposalStatus;
  /** The label the code got (differs from `label` when the lead renamed it), or the code it was merged into. */
  decidedLabel: string | null;
  mergedInto: string | null;
  decidedBy: string | null;
  decidedAt: number | null;
}

export interface NewProposal {
  label: string;
  author: string;
  inVivo?: boolean;
  textId?: string;
  quote?: string;
}

export const proposalsMap = (cb: Y.Doc) => cb.getMap<Y.Map<unknown>>(PROPOSALS_ROOT);

const cleanLabel = (label: string) => String(label ?? '').replace(/\s+/g, ' ').trim();

/** Proposes a code; returns its id (the code id it will have). In vivo: the words get quotation marks. */
export function proposeCode(cb: Y.Doc, input: NewProposal, clock: Clock = systemClock): string {
  if (typeof input.author !== 'string' || input.author === '') throw new InvalidArgumentError('a proposal needs an author');
  let label = cleanLabel(input.label);
  if (input.inVivo) label = label.replace(/^["“”\s]+|["“”\s]+$/g, '');
  if (label.length === 0) throw new InvalidArgumentError(input.inVivo ? 'in vivo code needs some selected words' : 'a code needs a label');
  if (label.length > 200) throw new InvalidArgumentError('a label has at most 200 characters');
  if (input.inVivo) label = `“${label}”`;
  const id = newId('k');
  cb.transact(() => {
    const m = new Y.Map<unknown>();
    m.set('label', label);
    m.set('inVivo', input.inVivo === true);
    m.set('author', input.author);
    m.set('createdAt', clock());
    m.set('textId', input.textId ?? null);
    m.set('quote', String(input.quote ?? '').slice(0, 500));
    m.set('status', 'pending');
    proposalsMap(cb).set(id, m);
  });
  return id;
}

function read(id: string, m: Y.Map<unknown>): ProposalView {
  const status = m.get('status');
  return {
    id,
    label: String(m.get('label') ?? ''),
    inVivo: m.get('inVivo') === true,
    author: String(m.get('author') ?? ''),
    createdAt: Number(m.get('createdAt') ?? 0),
    textId: (m.get('textId') as string | null) ?? null,
    quote: String(m.get('quote') ?? ''),
    status: status === 'accepted' || status === 'merged' ? status : 'pending',
    decidedLabel: (m.get('decidedLabel') as string | null) ?? null,
    mergedInto: (m.get('mergedInto') as string | null) ?? null,
    decidedBy: (m.get('decidedBy') as string | null) ?? null,
    decidedAt: (m.get('decidedAt') as number | null) ?? null,
  };
}

export function listProposals(cb: Y.Doc, filter: { status?: ProposalStatus; author?: string } = {}): ProposalView[] {
  const out: ProposalView[] = [];
  proposalsMap(cb).forEach((m, id) => {
    if (!(m instanceof Y.Map)) return;
    const v = read(id, m);
    if (filter.status !== undefined && v.status !== filter.status) return;
    if (filter.author !== undefined && v.author !== filter.author) return;
    out.push(v);
  });
  return out.sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : 1));
}

export function getProposal(cb: Y.Doc, id: string): ProposalView {
  const m = proposalsMap(cb).get(id);
  if (!(m instanceof Y.Map)) throw new NotFoundError('proposal', id);
  return read(id, m);
}

function pending(cb: Y.Doc, id: string): Y.Map<unknown> {
  const m = proposalsMap(cb).get(id);
  if (!(m instanceof Y.Map)) throw new NotFoundError('proposal', id);
  if (m.get('status') !== 'pending') throw new ConflictError('this proposal was already decided');
  return m;
}

/** Accepts a proposal as a code with the same id, under its own label or a new one (a rename). */
export function acceptProposal(cb: Y.Doc, id: string, actor: Actor, label?: string): void {
  const m = pending(cb, id);
  const final = label === undefined ? String(m.get('label')) : cleanLabel(label);
  if (final.length === 0) throw new InvalidArgumentError('a code needs a label');
  cb.transact(() => {
    addCode(cb, { id, label: final, inVivo: m.get('inVivo') === true }, actor);
    m.set('status', 'accepted');
    m.set('decidedLabel', final);
    m.set('decidedBy', actor.by);
    m.set('decidedAt', (actor.clock ?? systemClock)());
  });
}

/** Merges a proposal into an existing code: its id becomes a merged code, so segments carry over. */
export function mergeProposal(cb: Y.Doc, id: string, intoId: string, actor: Actor): void {
  const m = pending(cb, id);
  // checked first: a Yjs transaction does not roll back, so nothing may throw half-way
  if (!(codesMap(cb).get(intoId) instanceof Y.Map)) throw new NotFoundError('code', intoId);
  if (effectiveCodeId(cb, intoId) !== intoId) throw new ConflictError(`code ${intoId} is itself merged or split`);
  cb.transact(() => {
    addCode(cb, { id, label: String(m.get('label')), inVivo: m.get('inVivo') === true }, actor);
    mergeCodes(cb, [id], intoId, actor);
    m.set('status', 'merged');
    m.set('mergedInto', intoId);
    m.set('decidedBy', actor.by);
    m.set('decidedAt', (actor.clock ?? systemClock)());
  });
}

/**
 * Pending proposals shaped as draft codes, for screens that list codes (the code picker, segment
 * labels): a segment coded with a proposal shows "(proposed)" until the lead decides.
 */
export function pendingProposalCodes(cb: Y.Doc): CodeView[] {
  return listProposals(cb, { status: 'pending' }).map((p, i) => ({
    id: p.id,
    label: `${p.label} (proposed)`,
    briefDefinition: '',
    fullDefinition: '',
    inclusion: '',
    exclusion: '',
    examples: [],
    nearMisses: [],
    parentId: null,
    colour: paletteColour(codesMap(cb).size + i).hex,
    type: 'data-driven',
    status: 'draft',
    mergedInto: null,
    splitInto: [],
    inVivo: p.inVivo,
    createdAt: p.createdAt,
    createdBy: p.author,
  }));
}
