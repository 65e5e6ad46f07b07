/**
 * Sends a reader of the memos document only the entries they may read (issue 9). Every struct of an
 * update (a state answer or a relayed change) that belongs to a withheld entry — the entry's map item
 * and everything nested in it: fields, body text, deleted or not — is replaced by a GC struct of the
 * same id and length. GC is Yjs's own placeholder for content it no longer keeps: the client's clocks
 * advance exactly as with the real structs (later updates of every client still apply in order), and
 * nothing of the entry is readable. Entries are independent subtrees of the root map (a new key's item
 * has no origin in another key), so no visible struct ever points into a placeholder.
 *
 * Which entry a struct belongs to is read from the room's document, which holds every struct of the
 * update (states are taken from it; live updates reach peers only after they are applied to it).
 */
import * as Y from 'yjs';
import * as encoding from 'lib0/encoding';
import { MEMOS_ROOT } from '@gloss/model';

type Struct = Y.Item | Y.GC | Y.Skip;

/** The memos entry (top-level key) the struct with `id` belongs to; null for anything else. */
function entryOf(doc: Y.Doc, root: Y.AbstractType<unknown>, id: Y.ID): string | null {
  let struct: Y.AbstractStruct;
  try {
    struct = Y.getItem(doc.store, id);
  } catch {
    return null; // not in the document (cannot happen for states taken from it)
  }
  let item: Y.Item | null = struct instanceof Y.Item ? struct : null;
  while (item !== null) {
    const parent = item.parent as Y.AbstractType<unknown> | null;
    if (parent === null) return null;
    if (parent._item === null) return parent === root ? item.parentSub : null;
    item = parent._item;
  }
  return null;
}

/**
 * `update` with the structs of entries `visible` refuses replaced by GC placeholders; the same bytes when
 * nothing is withheld. `doc` must hold every struct of `update`.
 */
export function filterMemosUpdate(doc: Y.Doc, update: Uint8Array, visible: (entry: string) => boolean): Uint8Array {
  const root = doc.getMap(MEMOS_ROOT) as unknown as Y.AbstractType<unknown>;
  const { structs, ds } = Y.decodeUpdate(update);
  const decided = new Map<string, boolean>();
  let withheld = 0;
  const out: Struct[] = structs.map((s) => {
    if (!(s instanceof Y.Item)) return s as Struct;
    const key = entryOf(doc, root, s.id);
    if (key === null) return s;
    let ok = decided.get(key);
    if (ok === undefined) decided.set(key, (ok = visible(key)));
    if (ok) return s;
    withheld++;
    return new Y.GC(s.id, s.length);
  });
  return withheld === 0 ? update : encodeStructs(out, ds);
}

/** Update format v1 (as Yjs writes it in encoding.js `writeStructs` and DeleteSet.js `writeDeleteSet`). */
function encodeStructs(structs: Struct[], ds: { clients: Map<number, Array<{ clock: number; len: number }>> }): Uint8Array {
  const encoder = new Y.UpdateEncoderV1();
  const byClient = new Map<number, Struct[]>();
  for (const s of structs) {
    const list = byClient.get(s.id.client);
    if (list) list.push(s);
    else byClient.set(s.id.client, [s]);
  }
  encoding.writeVarUint(encoder.restEncoder, byClient.size);
  for (const [client, list] of byClient) {
    encoding.writeVarUint(encoder.restEncoder, list.length);
    encoder.writeClient(client);
    encoding.writeVarUint(encoder.restEncoder, list[0]!.id.clock);
    for (const s of list) s.write(encoder, 0);
  }
  encoding.writeVarUint(encoder.restEncoder, ds.clients.size);
  for (const [client, items] of [...ds.clients.entries()].sort((a, b) => b[0] - a[0])) {
    encoder.resetDsCurVal();
    encoding.writeVarUint(encoder.restEncoder, client);
    encoding.writeVarUint(encoder.restEncoder, items.length);
    for (const item of items) {
      encoder.writeDsClock(item.clock);
      encoder.writeDsLen(item.len);
    }
  }
  return encoder.toUint8Array();
}
