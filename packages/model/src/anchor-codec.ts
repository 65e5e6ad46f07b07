import * as Y from 'yjs';

/**
 * The fields of an encoded RelativePosition that resolution needs, read without building lib0 decoders:
 * at 20,000 anchors `Y.decodeRelativePosition` was most of a cold resolution. Layout (Yjs 13
 * `writeRelativePosition`): varUint tag (0 = item id, 1 = root type name, 2 = type id), then for tag 0
 * varUint client and varUint clock, then an optional varInt assoc (lib0: sign in bit 0x40 of the first
 * byte). Anything but tag 0 goes through Yjs's own decoder.
 */
export interface AnchorFields {
  /** null when the anchor names the start or end of a type rather than an item */
  client: number | null;
  clock: number;
  assoc: number;
  /** root type name (tag 1), else null */
  tname: string | null;
}

function readVarUint(a: Uint8Array, p: { i: number }): number {
  let num = 0;
  let mult = 1;
  for (;;) {
    const r = a[p.i++];
    if (r === undefined) throw new RangeError('truncated anchor');
    num += (r & 0x7f) * mult;
    if (r < 0x80) return num;
    mult *= 128;
  }
}

function readVarInt(a: Uint8Array, p: { i: number }): number {
  let r = a[p.i++]!;
  let num = r & 0x3f;
  let mult = 64;
  const sign = (r & 0x40) > 0 ? -1 : 1;
  while (r & 0x80) {
    r = a[p.i++]!;
    if (r === undefined) throw new RangeError('truncated anchor');
    num += (r & 0x7f) * mult;
    mult *= 128;
  }
  return sign * num;
}

export function decodeAnchor(anchor: Uint8Array): AnchorFields {
  if (anchor[0] === 0) {
    const p = { i: 1 };
    const client = readVarUint(anchor, p);
    const clock = readVarUint(anchor, p);
    const assoc = p.i < anchor.length ? readVarInt(anchor, p) : 0;
    return { client, clock, assoc, tname: null };
  }
  const r = Y.decodeRelativePosition(anchor);
  return { client: null, clock: 0, assoc: r.assoc, tname: r.tname };
}
