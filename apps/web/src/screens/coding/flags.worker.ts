/**
 * Flags off the main thread: this worker keeps replicas of the text, the codebook and the layers (fed
 * with the same Yjs updates as the page's documents) and runs the model's FlagEngine on them, so a busy
 * text (thousands of overlapping segments) never blocks typing or scrolling.
 */
import * as Y from 'yjs';
import { FlagEngine } from '@gloss/model';
import type { FlagsRequest, FlagsReply } from './flags-protocol.js';
import { placeFlags } from '../../doc/flag-view.js';
import { packFlags, packedBuffers } from '../../doc/flag-pack.js';

const docs = new Map<string, Y.Doc>();
let engine: FlagEngine | undefined;
let visible = new Set<string>();
let coders = new Map<string, string>();
let queued = false;
/** Requests applied so far, sent with each reply. */
let handled = 0;

function doc(key: string): Y.Doc {
  let d = docs.get(key);
  if (!d) docs.set(key, (d = new Y.Doc({ gc: false })));
  return d;
}

/** Replies once changes pause for a moment: documents arrive in bursts, and each reply costs the page a copy. */
function post(): void {
  if (queued) return;
  queued = true;
  setTimeout(() => {
    queued = false;
    if (!engine) return;
    const flags = engine.flags();
    const segs = new Map(engine.segments().map((s) => [s.id, s]));
    const packed = packFlags(placeFlags(flags, segs));
    const reply: FlagsReply = { type: 'flags', flags: packed, handled };
    (self as unknown as Worker).postMessage(reply, packedBuffers(packed));
  }, 120);
}

self.onmessage = (e: MessageEvent<FlagsRequest>) => {
  const m = e.data;
  handled++;
  try {
    if (m.type === 'init') {
      Y.applyUpdate(doc('text'), m.text);
      Y.applyUpdate(doc('codebook'), m.codebook);
      coders = new Map(m.layers.map((l) => [l.layerId, l.coder]));
      for (const l of m.layers) Y.applyUpdate(doc(l.layerId), l.update);
      visible = new Set(m.visible);
      engine = new FlagEngine({
        textDoc: doc('text'),
        codebook: doc('codebook'),
        layers: m.layers.filter((l) => visible.has(l.layerId)).map((l) => ({ layerId: l.layerId, coder: l.coder, doc: doc(l.layerId) })),
        independentCoding: m.independentCoding,
      });
    } else if (m.type === 'update') {
      Y.applyUpdate(doc(m.doc), m.update);
    } else if (m.type === 'visible' && engine) {
      const next = new Set(m.layerIds);
      for (const id of next) if (!visible.has(id)) engine.addLayer({ layerId: id, coder: coders.get(id) ?? '', doc: doc(id) });
      for (const id of visible) if (!next.has(id)) engine.removeLayer(id);
      visible = next;
    } else if (m.type === 'independent' && engine) {
      engine.setIndependentCoding(m.on);
    }
    post();
  } catch (err) {
    const reply: FlagsReply = { type: 'error', message: err instanceof Error ? err.message : String(err) };
    (self as unknown as Worker).postMessage(reply);
  }
};
