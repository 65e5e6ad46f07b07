/**
 * Hostile sync traffic for the fuzz runs (issue 13): seeded, so a run can be repeated. Message layout
 * per y-protocols 1.0.7 (sync.js: 0 = sync with steps 0/1/2; awareness.js: 1 = awareness update;
 * 3 = query awareness); varints per lib0 (7 bits per byte, high bit = more).
 */
import * as encoding from 'lib0/encoding';
import * as prng from 'lib0/prng';
import * as Y from 'yjs';

export type HostileKind =
  | 'random-bytes'
  | 'truncated-varint'
  | 'huge-length'
  | 'corrupt-update'
  | 'valid-update-read-only'
  | 'presence-spoof'
  | 'presence-removal-spoof'
  | 'oversized-presence'
  | 'bad-awareness-json'
  | 'text-frame'
  | 'state-vector-junk';

export interface Hostile {
  kind: HostileKind;
  data: Uint8Array | string;
}

const build = (write: (e: encoding.Encoder) => void): Uint8Array => {
  const e = encoding.createEncoder();
  write(e);
  return encoding.toUint8Array(e);
};

function awareness(clientId: number, clock: number, state: string): Uint8Array {
  return build((e) => {
    encoding.writeVarUint(e, 1);
    const inner = build((i) => {
      encoding.writeVarUint(i, 1);
      encoding.writeVarUint(i, clientId);
      encoding.writeVarUint(i, clock);
      encoding.writeVarString(i, state);
    });
    encoding.writeVarUint8Array(e, inner);
  });
}

/** A generator of hostile messages; `victimClientId()` is the well-behaved client's presence id, read when used. */
export function hostileMessages(seed: number, victimClientId: () => number) {
  const gen = prng.create(seed);
  const int = (min: number, max: number) => prng.int32(gen, min, max);
  const bytes = (n: number) => Uint8Array.from({ length: n }, () => prng.uint32(gen, 0, 255));
  const validUpdate = () => {
    const d = new Y.Doc();
    d.getText('text').insert(0, prng.word(gen, 1, 12));
    d.getMap('segments').set(prng.word(gen, 4, 8), prng.word(gen));
    return Y.encodeStateAsUpdate(d);
  };
  const makers: Array<[HostileKind, number, () => Uint8Array | string]> = [
    ['random-bytes', 20, () => bytes(int(0, 1) === 0 ? int(0, 16) : int(17, 4096))],
    ['truncated-varint', 10, () => Uint8Array.from([...[[], [0], [0, 2], [1], [0, 0]][int(0, 4)]!, ...Array.from({ length: int(1, 9) }, () => 0x80 | int(0, 127))])],
    [
      'huge-length',
      10,
      () =>
        build((e) => {
          const [type, step] = [[0, 2], [0, 1], [0, 0], [1, -1]][int(0, 3)]!;
          encoding.writeVarUint(e, type!);
          if (step! >= 0) encoding.writeVarUint(e, step!);
          encoding.writeVarUint(e, [2 ** 31, 2 ** 32 + 5, Number.MAX_SAFE_INTEGER, 10 * 1024 * 1024][int(0, 3)]!);
          encoding.writeUint8Array(e, bytes(int(0, 8)));
        }),
    ],
    [
      'corrupt-update',
      15,
      () => {
        const u = validUpdate();
        const cut = int(0, 2);
        const body = cut === 0 ? u.slice(0, int(1, u.length - 1)) : cut === 1 ? u.map((b) => (prng.bool(gen) && prng.bool(gen) ? int(0, 255) : b)) : bytes(int(1, 64));
        return build((e) => {
          encoding.writeVarUint(e, 0);
          encoding.writeVarUint(e, 2);
          encoding.writeVarUint8Array(e, body);
        });
      },
    ],
    [
      'valid-update-read-only',
      15,
      () =>
        build((e) => {
          encoding.writeVarUint(e, 0);
          encoding.writeVarUint(e, prng.bool(gen) ? 2 : 1);
          encoding.writeVarUint8Array(e, validUpdate());
        }),
    ],
    ['presence-spoof', 8, () => awareness(victimClientId(), int(1_000, 2 ** 30), JSON.stringify({ user: { name: 'spoofed' }, cursor: null }))],
    ['presence-removal-spoof', 8, () => awareness(victimClientId(), int(1_000, 2 ** 30), 'null')],
    ['oversized-presence', 2, () => awareness(int(1, 2 ** 30), 1, JSON.stringify({ pad: 'x'.repeat(70 * 1024) }))],
    ['bad-awareness-json', 4, () => awareness(int(1, 2 ** 30), 1, '{"not json')],
    ['text-frame', 2, () => prng.word(gen, 1, 40)],
    [
      'state-vector-junk',
      6,
      () =>
        build((e) => {
          encoding.writeVarUint(e, 0);
          encoding.writeVarUint(e, 0);
          encoding.writeVarUint8Array(e, bytes(int(0, 32)));
        }),
    ],
  ];
  const total = makers.reduce((n, [, w]) => n + w, 0);
  return {
    next(): Hostile {
      let pick = int(0, total - 1);
      for (const [kind, weight, make] of makers) {
        if (pick < weight) return { kind, data: make() };
        pick -= weight;
      }
      throw new Error('unreachable');
    },
    /** 1..max, from the same seed. */
    count: (max: number) => int(1, max),
  };
}
