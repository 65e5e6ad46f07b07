/** Messages between the coding view and the flags worker. */
import type { PackedFlags } from '../../doc/flag-pack.js';

export type FlagsRequest =
  | { type: 'init'; text: Uint8Array; codebook: Uint8Array; layers: Array<{ layerId: string; coder: string; update: Uint8Array }>; visible: string[]; independentCoding: boolean }
  | { type: 'update'; doc: string; update: Uint8Array }
  | { type: 'visible'; layerIds: string[] }
  | { type: 'independent'; on: boolean };

export type FlagsReply = { type: 'flags'; flags: PackedFlags } | { type: 'error'; message: string };
