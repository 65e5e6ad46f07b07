import * as Y from 'yjs';
import { codesMap, currentRound, DEFINITION_FIELDS, type DefinitionField } from './codebook-doc.js';
import { systemClock, type Clock } from './ids.js';

/**
 * Causal records of definition edits, for the `definition-race` flag.
 *
 * Yjs deletions carry no author and a distant insertion names only its neighbours, so the structs alone
 * cannot say whether two edits of one field were concurrent. Each client therefore records, when it
 * starts a run of edits on a field, the state vector it had then (`seen`). A run lasts until another
 * client's change to the same field arrives or this client edits another field, so every edit of the run
 * had seen exactly `seen` of that field. After each edit the record's `to` is moved past the clock of
 * the record write itself: a replica holding this client's state up to `to` has seen the whole run
 * (Yjs delivers one client's updates in clock order). Runs a (client A) and b (client B) contain a
 * concurrent pair of edits iff  b.seen[A] < a.to  and  a.seen[B] < b.to  — causality from clocks and
 * state vectors only, never wall-clock time (`at` is for display and for `stale-definition`).
 *
 * Records are Y.Maps written in their own transaction with origin FIELD_EDIT_ORIGIN, which undo managers
 * ignore (trackedOrigins never includes it).
 */
export const FIELD_EDITS_ROOT = 'fieldEdits';
export const FIELD_EDIT_ORIGIN = Symbol('gloss-field-edit-record');

export interface FieldEditRecord {
  codeId: string;
  field: DefinitionField;
  client: number;
  /** This client's clock when the run began. */
  from: number;
  /** Exclusive end: holding this client's clocks below `to` means having seen the whole run. */
  to: number;
  /** `Y.encodeStateVector` of this replica before the run began. */
  seen: Uint8Array;
  at: number;
  by: string;
  round: number;
}

export const fieldEditsMap = (cb: Y.Doc) => cb.getMap<Y.Map<unknown>>(FIELD_EDITS_ROOT);

function readRecord(m: Y.Map<unknown>): FieldEditRecord | null {
  const r = m.toJSON() as Partial<FieldEditRecord>;
  const seen = m.get('seen');
  if (!(seen instanceof Uint8Array) || typeof r.codeId !== 'string' || typeof r.client !== 'number' || typeof r.to !== 'number') return null;
  if (!(DEFINITION_FIELDS as readonly string[]).includes(r.field as string)) return null;
  return {
    codeId: r.codeId, field: r.field as DefinitionField, client: r.client, from: Number(r.from ?? 0), to: r.to, seen,
    at: Number(r.at ?? 0), by: String(r.by ?? ''), round: Number(r.round ?? 0),
  };
}

export function listFieldEdits(cb: Y.Doc, codeId?: string, field?: DefinitionField): FieldEditRecord[] {
  const out: FieldEditRecord[] = [];
  fieldEditsMap(cb).forEach((m) => {
    const r = m instanceof Y.Map ? readRecord(m) : null;
    if (r === null) return;
    if (codeId !== undefined && r.codeId !== codeId) return;
    if (field !== undefined && r.field !== field) return;
    out.push(r);
  });
  return out.sort((a, b) => a.client - b.client || a.from - b.from);
}

function encodeSv(sv: Map<number, number>): Uint8Array {
  // Y.encodeStateVector accepts a Doc or a Map<client, clock>.
  return Y.encodeStateVector(sv as unknown as Y.Doc);
}

/** Locate a changed definition Y.Text: codes/<codeId>/<field>. */
function definitionOf(cb: Y.Doc, event: Y.YEvent<Y.AbstractType<unknown>>): { codeId: string; field: DefinitionField } | null {
  if (!(event.target instanceof Y.Text)) return null;
  const path = event.path;
  if (path.length !== 2) return null;
  const [codeId, field] = path as [string, string];
  if (!(DEFINITION_FIELDS as readonly string[]).includes(field)) return null;
  if (!(codesMap(cb).get(codeId) instanceof Y.Map)) return null;
  return { codeId, field: field as DefinitionField };
}

/**
 * Start recording this replica's definition edits. `by` names the user (shown beside a race).
 * Returns a function that stops recording.
 */
export function trackFieldEdits(cb: Y.Doc, who: { by: string; clock?: Clock }): () => void {
  const clock = who.clock ?? systemClock;
  let run: { codeId: string; field: string; record: Y.Map<unknown> } | null = null;
  const codes = codesMap(cb);
  const handler = (events: Array<Y.YEvent<Y.AbstractType<unknown>>>, tr: Y.Transaction) => {
    if (tr.origin === FIELD_EDIT_ORIGIN) return;
    for (const ev of events) {
      const def = definitionOf(cb, ev);
      if (def === null) continue;
      const same = run !== null && run.codeId === def.codeId && run.field === def.field;
      if (!tr.local) {
        if (same) run = null; // another client's change to this field: the next local edit starts a new run
        continue;
      }
      cb.transact(() => {
        if (!same || run === null) {
          const from = tr.beforeState.get(cb.clientID) ?? 0;
          const record = new Y.Map<unknown>();
          fieldEditsMap(cb).set(`${cb.clientID}:${from}:${def.codeId}:${def.field}`, record);
          record.set('codeId', def.codeId);
          record.set('field', def.field);
          record.set('client', cb.clientID);
          record.set('from', from);
          record.set('seen', encodeSv(tr.beforeState));
          record.set('at', clock());
          record.set('by', who.by);
          record.set('round', currentRound(cb));
          run = { ...def, record };
        }
        // `to` must cover the write that carries it, so it is the state after one more struct.
        run.record.set('to', Y.getState(cb.store, cb.clientID) + 1);
      }, FIELD_EDIT_ORIGIN);
    }
  };
  codes.observeDeep(handler);
  return () => codes.unobserveDeep(handler);
}
