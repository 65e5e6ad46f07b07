/**
 * The flags of one open text as a signal. In a browser the model's FlagEngine runs in a worker fed with
 * every Yjs update; where workers do not exist (unit tests) it runs here, on the page's documents.
 */
import { createEffect, createSignal, onCleanup, type Accessor } from 'solid-js';
import * as Y from 'yjs';
import { FlagEngine } from '@gloss/model';
import { placeFlags } from '../../doc/flag-view.js';
import { EMPTY_FLAGS, flagSetOf, unpackFlags, type FlagSet } from '../../doc/flag-pack.js';
import type { OpenDoc } from '../../sync/open-doc.js';
import type { LayerHandle } from './coding-state.js';
import type { FlagsReply, FlagsRequest } from './flags-protocol.js';

/** A valid update that changes nothing (a layer's state is sent after the worker starts). */
const EMPTY_STATE = Y.encodeStateAsUpdate(new Y.Doc());

export function useFlags(text: OpenDoc, codebook: OpenDoc, allLayers: readonly LayerHandle[], visible: Accessor<LayerHandle[]>, independent: Accessor<boolean>): { flags: Accessor<FlagSet>; error: Accessor<string>; checking: Accessor<boolean> } {
  const [flags, setFlags] = createSignal<FlagSet>(EMPTY_FLAGS);
  // True until the worker has answered with every layer the page opened with: until then "no flags"
  // would only mean "not looked yet".
  const [checking, setChecking] = createSignal(typeof Worker !== 'undefined');
  const [error, setError] = createSignal('');
  const ids = () => visible().map((l) => l.doc.room);

  if (typeof Worker === 'undefined') {
    const engine = new FlagEngine({ textDoc: text.doc, codebook: codebook.doc, layers: visible().map((l) => ({ layerId: l.doc.room, coder: l.coderId, doc: l.doc.doc })), independentCoding: independent() });
    const refresh = () => setFlags(flagSetOf(placeFlags(engine.flags(), new Map(engine.segments().map((s) => [s.id, s])))));
    const docs = [text.doc, codebook.doc, ...allLayers.map((l) => l.doc.doc)];
    docs.forEach((d) => d.on('afterTransaction', refresh));
    onCleanup(() => {
      docs.forEach((d) => d.off('afterTransaction', refresh));
      engine.destroy();
    });
    refresh();
    return { flags, error, checking };
  }

  const worker = new Worker(new URL('./flags.worker.ts', import.meta.url), { type: 'module' });
  let sent = 0;
  /** Requests the worker must have handled for its answer to cover every opening state (known once the last is sent). */
  let complete = Infinity;
  const send = (m: FlagsRequest) => {
    sent++;
    worker.postMessage(m);
  };
  worker.onmessage = (e: MessageEvent<FlagsReply>) => {
    if (e.data.type === 'flags') {
      setFlags(unpackFlags(e.data.flags));
      if (e.data.handled >= complete) setChecking(false);
    } else {
      setError(e.data.message);
      setChecking(false);
    }
  };
  // The text goes with the first message (the engine reads every later change as an edit of it); each
  // layer's state follows in a task of its own, as encoding five layers with the text in one task held
  // the page for hundreds of milliseconds while a text opened (issue 11). A change a layer makes
  // meanwhile is forwarded as it happens; Yjs applies it in the worker whichever arrives first.
  send({
    type: 'init',
    text: Y.encodeStateAsUpdate(text.doc),
    codebook: Y.encodeStateAsUpdate(codebook.doc),
    layers: allLayers.map((l) => ({ layerId: l.doc.room, coder: l.coderId, update: EMPTY_STATE })),
    visible: ids(),
    independentCoding: independent(),
  });
  const states = allLayers.filter((l) => l.doc.doc.store.clients.size > 0);
  let stopped = false;
  let timer = 0;
  const sendNextState = () => {
    const l = states.shift();
    if (stopped || !l) return;
    send({ type: 'update', doc: l.doc.room, update: Y.encodeStateAsUpdate(l.doc.doc) });
    if (states.length > 0) timer = window.setTimeout(sendNextState, 0);
    else complete = sent;
  };
  if (states.length > 0) timer = window.setTimeout(sendNextState, 0);
  else complete = sent;
  const forward = (key: string) => (update: Uint8Array) => send({ type: 'update', doc: key, update });
  const pairs: Array<[Y.Doc, (u: Uint8Array) => void]> = [
    [text.doc, forward('text')],
    [codebook.doc, forward('codebook')],
    ...allLayers.map((l) => [l.doc.doc, forward(l.doc.room)] as [Y.Doc, (u: Uint8Array) => void]),
  ];
  for (const [d, f] of pairs) d.on('update', f);
  createEffect(() => send({ type: 'visible', layerIds: ids() }));
  createEffect(() => send({ type: 'independent', on: independent() }));
  onCleanup(() => {
    stopped = true;
    clearTimeout(timer);
    for (const [d, f] of pairs) d.off('update', f);
    worker.terminate();
  });
  return { flags, error, checking };
}
