/**
 * Presence inside one text, on the text document's awareness: each person's caret and selection as
 * encoded RelativePositions (so they stay on the right words while the text changes).
 */
import { createSignal, onCleanup, type Accessor } from 'solid-js';
import * as Y from 'yjs';
import { fromBase64, toBase64 } from 'lib0/buffer';
import type { OpenDoc } from '../../sync/open-doc.js';
import { personColour } from '../../doc/palette.js';
import type { Me } from '../../api/types.js';

export interface RemoteCaret { clientId: number; name: string; colour: string; start: number; end: number }

export function useTextPresence(text: OpenDoc, me: Me): { remote: Accessor<RemoteCaret[]>; publish(sel: { anchor: number; head: number } | null): void } {
  const aw = text.provider.awareness;
  const ytext = text.doc.getText('text');
  aw.setLocalStateField('user', { id: me.id, name: me.name, colour: personColour(me.id) });
  const [remote, setRemote] = createSignal<RemoteCaret[]>([]);
  const read = () => {
    const out: RemoteCaret[] = [];
    aw.getStates().forEach((st, clientId) => {
      if (clientId === aw.clientID) return;
      const u = st.user as { name?: string; colour?: string } | undefined;
      const c = st.caret as { a?: string; h?: string } | undefined;
      if (!u || !c?.a || !c.h) return;
      try {
        const a = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(fromBase64(c.a)), text.doc, false);
        const h = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(fromBase64(c.h)), text.doc, false);
        if (!a || !h) return;
        out.push({ clientId, name: u.name ?? '', colour: u.colour ?? '#777777', start: Math.min(a.index, h.index), end: Math.max(a.index, h.index) });
      } catch {
        // a malformed caret from a peer is ignored, not fatal
      }
    });
    setRemote(out);
  };
  aw.on('change', read);
  ytext.observe(read);
  onCleanup(() => {
    aw.off('change', read);
    ytext.unobserve(read);
    aw.setLocalStateField('caret', null);
  });
  return {
    remote,
    publish(sel) {
      if (!sel) return aw.setLocalStateField('caret', null);
      const enc = (i: number) => toBase64(Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(ytext, Math.min(i, ytext.length), 0)));
      aw.setLocalStateField('caret', { a: enc(sel.anchor), h: enc(sel.head) });
    },
  };
}
