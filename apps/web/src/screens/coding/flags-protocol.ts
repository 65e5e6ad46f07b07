/** Messages between the coding view and the flags worker. */
import type { PackedFlags } from '../../doc/flag-pack.js';

export type FlagsRequest =
  | { type: 'init'; text: Uint8Array; codebook: Uint8Array; layers: Array<{ layerId: string; coder: string; update: Uint8Array }>; visible: string[]; independentCoding: boolean }
  | { type: 'update'; doc: string; update: Uint8Array }
  | { type: 'visible'; layerIds: string[] }
  | { type: 'independent'; on: boolean };

/** `handled`: requests the worker had applied when it computed these flags (the page knows when its opening states are all in). */
export type FlagsReply = { type: 'flags'; flags: PackedFlags; handled: number } | { type: 'error'; message: string };
