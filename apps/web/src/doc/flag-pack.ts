/**
 * Flags in a compact form for the trip from the flags worker to the page. A busy text carries tens of
 * thousands of flags; as objects they cost the page a long structured-clone and garbage on every reply.
 * Packed, they are a few typed arrays (transferred, not copied) and two string tables, and the page
 * builds a `Flag` object only for the flags it shows (`FlagSet.at`).
 */
import { FLAG_KINDS } from '@gloss/model';
import type { Flag, FlagKind } from './flag-view.js';

export interface PackedFlags {
  count: number;
  /** index into FLAG_KINDS */
  kind: Uint8Array;
  start: Int32Array;
  end: Int32Array;
  /** flag i's segment ids are names[segs[segOff[i]] .. segs[segOff[i + 1] - 1]]; the same for codes */
  segOff: Uint32Array;
  segs: Uint32Array;
  codeOff: Uint32Array;
  codes: Uint32Array;
  /** segment and code ids, each once */
  names: string[];
  /** every flag's id, joined; flag i's is keys.slice(keyOff[i], keyOff[i + 1]) */
  keys: string;
  keyOff: Uint32Array;
  /** the codebook field of definition races, by flag index */
  fields: Array<[number, string]>;
}

/** A read-only list of flags, sorted by place, whose entries are made on demand. */
export interface FlagSet {
  readonly length: number;
  kindAt(i: number): FlagKind;
  startAt(i: number): number;
  at(i: number): Flag;
}

export const EMPTY_FLAGS: FlagSet = flagSetOf([]);

export function flagSetOf(flags: readonly Flag[]): FlagSet {
  return { length: flags.length, kindAt: (i) => flags[i]!.kind, startAt: (i) => flags[i]!.start, at: (i) => flags[i]! };
}

export function packFlags(flags: readonly Flag[]): PackedFlags {
  const n = flags.length;
  const kindIndex = new Map<string, number>(FLAG_KINDS.map((k, i) => [k, i]));
  const nameIndex = new Map<string, number>();
  const names: string[] = [];
  const name = (s: string) => {
    let i = nameIndex.get(s);
    if (i === undefined) {
      nameIndex.set(s, (i = names.length));
      names.push(s);
    }
    return i;
  };
  const kind = new Uint8Array(n);
  const start = new Int32Array(n);
  const end = new Int32Array(n);
  const segOff = new Uint32Array(n + 1);
  const codeOff = new Uint32Array(n + 1);
  const keyOff = new Uint32Array(n + 1);
  const segs: number[] = [];
  const codes: number[] = [];
  const keys: string[] = [];
  const fields: Array<[number, string]> = [];
  let keyLength = 0;
  flags.forEach((f, i) => {
    kind[i] = kindIndex.get(f.kind)!;
    start[i] = f.start;
    end[i] = f.end;
    for (const s of f.segmentIds) segs.push(name(s));
    for (const c of f.codeIds) codes.push(name(c));
    segOff[i + 1] = segs.length;
    codeOff[i + 1] = codes.length;
    keys.push(f.id);
    keyOff[i + 1] = keyLength += f.id.length;
    if (f.field !== undefined) fields.push([i, f.field]);
  });
  return { count: n, kind, start, end, segOff, segs: Uint32Array.from(segs), codeOff, codes: Uint32Array.from(codes), names, keys: keys.join(''), keyOff, fields };
}

/** The buffers of a packed list, to transfer rather than copy. */
export function packedBuffers(p: PackedFlags): ArrayBuffer[] {
  return [p.kind, p.start, p.end, p.segOff, p.segs, p.codeOff, p.codes, p.keyOff].map((a) => a.buffer as ArrayBuffer);
}

export function unpackFlags(p: PackedFlags): FlagSet {
  const fields = new Map(p.fields);
  const made = new Map<number, Flag>();
  const names = (off: Uint32Array, idx: Uint32Array, i: number) => {
    const out: string[] = [];
    for (let j = off[i]!; j < off[i + 1]!; j++) out.push(p.names[idx[j]!]!);
    return out;
  };
  return {
    length: p.count,
    kindAt: (i) => FLAG_KINDS[p.kind[i]!]!,
    startAt: (i) => p.start[i]!,
    at(i) {
      let f = made.get(i);
      if (f) return f;
      if (!(i >= 0 && i < p.count)) throw new RangeError(`no flag ${i} of ${p.count}`);
      f = {
        id: p.keys.slice(p.keyOff[i]!, p.keyOff[i + 1]!),
        kind: FLAG_KINDS[p.kind[i]!]!,
        start: p.start[i]!,
        end: p.end[i]!,
        segmentIds: names(p.segOff, p.segs, i),
        codeIds: names(p.codeOff, p.codes, i),
      };
      const field = fields.get(i);
      if (field !== undefined) f.field = field;
      made.set(i, f);
      return f;
    },
  };
}
