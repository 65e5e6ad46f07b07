/**
 * The coding view: transcript and margin on the left; picker, chosen segment, flags, layers and people
 * on the right. Opens the text document and every layer the server lets this person see.
 */
import { Show, createEffect, createMemo, createResource, createSignal, onCleanup, untrack, type JSX } from 'solid-js';
import type { LayerInfo, Me } from '../../api/types.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { api } from '../../api/client.js';
import { Loading } from '../../ui/Loading.js';
import { href } from '../../ui/router.js';
import { nextInOwnTask, openDoc, unprime, type OpenDoc } from '../../sync/open-doc.js';
import { openText } from '../../sync/opening.js';
import { CodingView } from './CodingView.js';
import type { LayerHandle } from './coding-state.js';

/**
 * `layers` narrows the layers opened (a round's text shows that round's layers only; elsewhere the
 * layers coded outside rounds); `banner` goes above the text (a round's "done" mark).
 */
export function CodingScreen(props: { studyId: string; textId: string; scope: StudyScope; me: Me; segmentId?: string | undefined; memoId?: string | undefined; layers?: (l: LayerInfo) => boolean; banner?: JSX.Element }) {
  const [detail] = createResource(() => props.textId, (id) => api.text(id));
  // every document's state in one request, alongside the text's rooms (sync/opening.ts); never fails.
  // The documents open meanwhile from their offline copies (a second open draws from them at once);
  // their sockets wait for it, so they connect with the ticket and exchange only what changed.
  let opening: { textId: string; done: Promise<string[]> } | undefined;
  const openingOf = (textId: string) => (opening?.textId === textId ? opening : (opening = { textId, done: openText(textId) })).done;
  createEffect(() => void openingOf(props.textId));
  const [docs, setDocs] = createSignal<{ text: OpenDoc; layers: LayerHandle[] }>();
  const [loaded, setLoaded] = createSignal(false);

  createEffect(() => {
    const d = detail();
    if (!d) return;
    const done = openingOf(props.textId);
    // A participant coding this text independently in a round codes in the round's layer, which only the
    // round's text screen opens (with the "done" mark): there is no layer for them here, so go there.
    if (!props.layers && d.round?.participant && d.round.phase === 'independent') {
      location.replace(href({ name: 'round-text', studyId: props.studyId, roundId: d.round.id, textId: props.textId }));
      return;
    }
    untrack(() => {
      const text = openDoc(d.room, { label: `“${d.title || 'this text'}”`, gc: false, holdUntil: done });
      const layers = d.layers.filter(props.layers ?? ((l) => !l.round)).map((l) => {
        const mine = l.mine ?? l.coderId === props.me.id;
        return { coderId: l.coderId, name: mine ? `${l.name ?? props.me.name} (you)` : l.kind === 'consensus' ? 'Consensus' : l.name ?? l.coderId, mine, kind: l.kind, canWrite: l.canWrite, doc: openDoc(l.room, { label: mine ? 'your coding' : `${l.name ?? 'a'} layer`, gc: false, offline: mine || l.canWrite === true, holdUntil: done }) };
      });
      setDocs({ text, layers });
      // draw once the text and every layer hold the server's state (or the offline copy)
      let live = true;
      performance.mark('gloss:docs-opening');
      // the text first (its words can be read at once); layers draw as they arrive. The view mounts in a
      // task of its own, next after the one that applied the text. Mounting it in that task (b4d3e9b) was
      // measured in one run beside this (load 7-9, 10k and 30k words): the text showed 54-86 ms after the
      // opening request returned, against 51-105 ms in a task of its own, no clear gain, while at 100k
      // words the joined task took up to 560 ms (issue 11).
      void text.whenReady.then(() => {
        performance.mark('gloss:text-ready');
        nextInOwnTask(() => live && setLoaded(true));
      });
      props.scope.setWhere(props.textId, d.title);
      onCleanup(() => {
        props.scope.setWhere(undefined, undefined);
        text.release();
        layers.forEach((l) => l.doc.release());
        live = false;
        void done.then(unprime);
        setLoaded(false);
        setDocs(undefined);
      });
    });
  });

  const ready = createMemo(() => {
    const d = docs();
    const cb = props.scope.codebook();
    const mm = props.scope.memos();
    return d && cb && mm && loaded() ? { ...d, codebook: cb, memos: mm } : undefined;
  });

  return (
    <main class="page coding-page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="coding" />
      <Loading loading={detail.loading} error={detail.error} what="this text">
        <h2 class="text-title">{detail()?.title}</h2>
        {props.banner}
        <Show when={ready()} keyed fallback={<p class="progress">Opening the text…</p>}>
          {(r) => <CodingView {...r} studyId={props.studyId} textId={props.textId} scope={props.scope} me={props.me} goToSegment={props.segmentId} goToMemo={props.memoId} />}
        </Show>
      </Loading>
    </main>
  );
}
